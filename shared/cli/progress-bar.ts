/**
 * The command line's progress bar on stderr: on a terminal the `cli-progress` package draws it in place (bar,
 * share done, count, elapsed time, ETA and the current figure); elsewhere (logs, CI) a plain line is printed at
 * every 10 % and at the end, with no timer left running if training stops early.
 */
import cliProgress from 'cli-progress';

export interface ProgressSink {
  write(text: string): unknown;
  isTTY?: boolean;
}

export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return '--';
  const s = Math.round(seconds);
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const r = s % 60;
  return h > 0 ? `${h}h${String(m).padStart(2, '0')}m` : m > 0 ? `${m}m${String(r).padStart(2, '0')}s` : `${r}s`;
}

const FORMAT = '[{bar}] {percentage}% {value}/{total}  elapsed {duration_formatted}  ETA {eta_formatted}  {note}';

export class ProgressBar {
  private readonly start = Date.now();
  private lastShare = -1;
  private lastDraw = 0;
  private bar: cliProgress.SingleBar | null = null;

  constructor(private readonly total: number, private readonly sink: ProgressSink, private readonly width = 28) {}

  /** Draws the bar at `done` of `total` with an extra note (e.g. the current figure); stops at the end. */
  update(done: number, note: string): void {
    if (this.sink.isTTY) {
      if (!this.bar) {
        this.bar = new cliProgress.SingleBar({
          stream: this.sink as unknown as NodeJS.WritableStream, format: FORMAT, barsize: this.width, barCompleteChar: '#',
          barIncompleteChar: '-', hideCursor: false, clearOnComplete: false, fps: 10, etaBuffer: 50,
        });
        this.bar.start(this.total, 0, { note });
      }
      this.bar.update(done, { note });
      const now = Date.now();
      if (now - this.lastDraw >= 100 || done >= this.total) {
        this.bar.render();
        this.lastDraw = now;
      }
      if (done >= this.total) this.stop();
      return;
    }
    const tenth = Math.floor((done / Math.max(1, this.total)) * 10);
    if (tenth > this.lastShare || done >= this.total) {
      this.lastShare = tenth;
      const elapsed = (Date.now() - this.start) / 1000;
      const eta = done > 0 ? (elapsed / done) * (this.total - done) : Number.NaN;
      const share = this.total > 0 ? Math.min(1, done / this.total) : 1;
      this.sink.write(`${(share * 100).toFixed(0).padStart(3)}% ${done}/${this.total}  elapsed ${formatDuration(elapsed)}  ETA ${formatDuration(eta)}  ${note}\n`);
    }
  }

  /** Ends the terminal bar (also when training stops early). */
  stop(): void {
    this.bar?.stop();
    this.bar = null;
  }
}
