/**
 * CPU milliseconds per step of several step functions timed interleaved in one process (the machine may be shared:
 * compare them only within one run): each round runs every one `steps` times, in an order that reverses every round,
 * and takes process.cpuUsage around it. Used by bench/ab-step.ts and bench/science/recipe-step-time.ts.
 */
import { loadavg } from 'node:os';

export interface Timed {
  label: string;
  step: () => unknown;
  /** Called before each of its timed blocks (e.g. to register its kernels), outside the timing. */
  before?: () => void;
}

/** CPU ms per step, one figure per round, for each of `timed` (same order). */
export function timeInterleaved(timed: readonly Timed[], rounds: number, steps: number): number[][] {
  const cpu: number[][] = timed.map(() => []);
  for (let r = 0; r < rounds; r++) {
    const order = timed.map((_, i) => (r % 2 === 0 ? i : timed.length - 1 - i));
    for (const i of order) {
      timed[i]!.before?.();
      const c0 = process.cpuUsage();
      for (let s = 0; s < steps; s++) timed[i]!.step();
      const c = process.cpuUsage(c0);
      cpu[i]!.push((c.user + c.system) / 1000 / steps);
    }
  }
  return cpu;
}

const median = (a: readonly number[]) => [...a].sort((x, y) => x - y)[Math.floor(a.length / 2)]!;

/** One line per step function: median, min and max CPU ms per step, plus `extra(i)`; load averages before and now. */
export function printInterleaved(timed: readonly Timed[], cpu: readonly number[][], load0: number[], heading: string, extra: (i: number) => string = () => ''): void {
  console.log(`load ${load0.map((x) => x.toFixed(2)).join(' ')} -> ${loadavg().map((x) => x.toFixed(2)).join(' ')}; ${heading}`);
  timed.forEach((t, i) => {
    const c = cpu[i]!;
    console.log(`${t.label.padEnd(40)} CPU ms/step median ${median(c).toFixed(1)} (min ${Math.min(...c).toFixed(1)}, max ${Math.max(...c).toFixed(1)})${extra(i)}`);
  });
}
