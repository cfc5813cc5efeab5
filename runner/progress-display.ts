/**
 * The runner's terminal: one progress line per job. On a terminal a cli-progress multibar (one bar per thread);
 * elsewhere (logs, pipes, tests) plain lines, at most one per job every `plainEveryMs` plus one when a job ends.
 * Figures are training costs in bits per character (the end-of-word symbol counted; lower is better).
 */
import cliProgress from 'cli-progress';
import type { JobProgress, JobResult } from './train-job';

export interface ProgressOutput {
  write(text: string): unknown;
  isTTY?: boolean;
}

function figure(p: JobProgress): string {
  if (p.bitsPerChar === null) return '';
  const label = p.isBound === false ? 'warm-up figure (not a bound)' : p.isBound === true ? 'bound' : 'exact';
  return `${p.bitsPerChar.toFixed(3)} bits/char (end-of-word counted), ${label}`;
}

const speed = (p: JobProgress) => (p.stepsPerSecond === null ? '-' : p.stepsPerSecond.toFixed(1));

export class ProgressDisplay {
  private readonly multibar: cliProgress.MultiBar | null;
  private readonly bars = new Map<string, cliProgress.SingleBar>();
  private readonly lastLine = new Map<string, number>();

  constructor(private readonly out: ProgressOutput, private readonly plainEveryMs = 5000) {
    this.multibar = out.isTTY
      ? new cliProgress.MultiBar({
        format: '{name} [{bar}] {value}/{total} steps  {speed} steps/s  {figure}',
        hideCursor: true, clearOnComplete: false, stopOnComplete: false, autopadding: true,
        stream: out as NodeJS.WritableStream,
      }, cliProgress.Presets.shades_classic)
      : null;
  }

  /** A line of its own (start-up, claims, problems). */
  note(text: string): void {
    if (this.multibar) this.multibar.log(`${text}\n`);
    else this.out.write(`${text}\n`);
  }

  update(p: JobProgress): void {
    const name = p.runName.slice(0, 24).padEnd(24);
    if (this.multibar) {
      const payload = { name, speed: speed(p), figure: figure(p) };
      const bar = this.bars.get(p.runId);
      if (bar) {
        bar.setTotal(Math.max(1, p.steps));
        bar.update(p.step, payload);
      } else {
        this.bars.set(p.runId, this.multibar.create(Math.max(1, p.steps), p.step, payload));
      }
      return;
    }
    const now = Date.now();
    if (now - (this.lastLine.get(p.runId) ?? 0) < this.plainEveryMs) return;
    this.lastLine.set(p.runId, now);
    this.out.write(`${p.runName}: step ${p.step}/${p.steps}  ${speed(p)} steps/s  ${figure(p)}\n`);
  }

  done(runName: string, r: JobResult): void {
    const bar = this.bars.get(r.runId);
    if (bar && this.multibar) {
      this.multibar.remove(bar);
      this.bars.delete(r.runId);
    }
    this.lastLine.delete(r.runId);
    this.note(`${runName}: ${r.status} at step ${r.step}${r.reason ? ` (${r.reason})` : ''}`);
  }

  stop(): void {
    this.multibar?.stop();
  }
}
