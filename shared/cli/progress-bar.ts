/** A small progress bar for stderr: bar, share done, count, elapsed time, ETA and the current figure. */

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

export class ProgressBar {
  private readonly start = Date.now();
  private lastLine = 0;
  private lastShare = -1;

  constructor(private readonly total: number, private readonly sink: ProgressSink, private readonly width = 28) {}

  /** Text of the bar at `done` of `total`, with an extra note (e.g. the current bound). */
  render(done: number, note: string, now = Date.now()): string {
    const share = this.total > 0 ? Math.min(1, done / this.total) : 1;
    const filled = Math.round(share * this.width);
    const elapsed = (now - this.start) / 1000;
    const eta = done > 0 ? (elapsed / done) * (this.total - done) : Number.NaN;
    return `[${'#'.repeat(filled)}${'-'.repeat(this.width - filled)}] ${(share * 100).toFixed(0).padStart(3)}% ` +
      `${done}/${this.total}  elapsed ${formatDuration(elapsed)}  ETA ${formatDuration(eta)}  ${note}`;
  }

  /** Redraws in place on a terminal; elsewhere prints a line at every 10 % (and at the end). */
  update(done: number, note: string): void {
    const line = this.render(done, note);
    if (this.sink.isTTY) {
      const now = Date.now();
      if (now - this.lastLine < 100 && done < this.total) return;
      this.lastLine = now;
      this.sink.write(`\r${line}\x1b[K`);
      if (done >= this.total) this.sink.write('\n');
      return;
    }
    const tenth = Math.floor((done / Math.max(1, this.total)) * 10);
    if (tenth > this.lastShare || done >= this.total) {
      this.lastShare = tenth;
      this.sink.write(`${line}\n`);
    }
  }
}
