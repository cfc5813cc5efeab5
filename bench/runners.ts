/**
 * `npm run bench:runners`: wall time of an 8-cell grid of small runs trained by a runner with 1 thread and with
 * 2 threads (one job per thread), on the real server (embedded back-end, loopback, temporary database) through
 * the runner routes. Rounds alternate the two set-ups (1, 2, 2, 1, ...) so a change in the machine's load hits
 * both. Each round starts a fresh runner and waits until its threads have loaded (start-up, reported apart and
 * in a second speed-up), then times the grid from its creation to the server's time of its last finish. Also
 * reports CPU seconds per grid (the main thread's apart: server and runner bookkeeping, from /proc on Linux).
 * First, with no server yet, it measures the machine's ceiling (bench/step-ceiling.ts): the bare training step of
 * the same runs in one worker thread alone and in two at once, so the grid's speed-up can be read against what two
 * threads can gain here at all. Writes bench/results/runners.json (`ceiling` among the figures) and prints the
 * figures. Target: 2 threads ≥ 1.7× faster on 2 cores.
 * Options (environment): BENCH_RUNNER_STEPS (steps per run, default 150), BENCH_RUNNER_ROUNDS (default 2),
 * BENCH_CEILING_STEPS (timed steps per ceiling thread, default 200; 0 leaves the ceiling out).
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { availableParallelism, cpus, loadavg } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { GridDto } from '../shared/api/grids';
import { startRunnerThreads } from '../runner/runner';
import { benchRunSettings, lowerMedian, measureCeiling, type CeilingResult } from './step-ceiling';
import { api, json, openLab, runnerToken, runsOf, startHarnessServer, waitFor, type Lab } from '../tests/cross/support/runner-harness';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const CELLS = 8;
const STEPS = Number(process.env['BENCH_RUNNER_STEPS'] ?? 150);
const ROUNDS = Number(process.env['BENCH_RUNNER_ROUNDS'] ?? 2);
const quiet = { write: () => true, isTTY: false };

const CEILING_STEPS = Number(process.env['BENCH_CEILING_STEPS'] ?? 200);
/** A small state-space model that trains at tens of steps per second on one core (state 8, K 4, batch 32). */
const SETTINGS = benchRunSettings(STEPS);

interface Measure { startupSeconds: number; wallSeconds: number; coresBusy: number; cpuSeconds: number; mainThreadCpuSeconds: number | null }

/**
 * CPU seconds of this process's main thread (the server, and the runner's main thread) from /proc (Linux;
 * null elsewhere). The training threads are the rest of the process's CPU time.
 */
function mainThreadCpuSeconds(): number | null {
  try {
    const stat = readFileSync(`/proc/self/task/${process.pid}/stat`, 'utf8');
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    // Fields 14 and 15 of proc(5) (utime, stime) in clock ticks: 100 per second on Linux (getconf CLK_TCK).
    return (Number(fields[11]) + Number(fields[12])) / 100;
  } catch {
    return null;
  }
}

/** Wall time of one grid, and the CPU time this process (server, runner and its threads) used meanwhile. */
async function measureGrid(base: string, lab: Lab, token: string, threads: number, round: number): Promise<Measure> {
  const runner = startRunnerThreads({ serverUrl: base, token, threads, name: `bench-${threads}`, output: quiet });
  try {
    // A runner is a long-running program: its threads load TF.js and compile the WASM backend once, before the
    // grid; that start-up is measured apart (startupSeconds), not in the grid's wall time.
    const s0 = performance.now();
    await runner.ready();
    const startupSeconds = (performance.now() - s0) / 1000;
    const t0 = performance.now();
    const started = Date.now();
    const cpu0 = process.cpuUsage();
    const main0 = mainThreadCpuSeconds();
    const grid = await api<GridDto>(base, `/benches/${lab.benchId}/grids`, lab.token, json({
      name: `bench ${threads} thread(s), round ${round}`, corpusId: lab.corpusId, family: 'ssm', baseSettings: SETTINGS,
      axes: [{ key: 'training.seed', values: Array.from({ length: CELLS }, (_, i) => 100 * round + threads * 10 + i) }], placement: 'runners',
    }));
    const ids = new Set(grid.cells.map((c) => c.run?.id));
    // Polled every 2 s (the polling is server work too); the end is the server's time of the last finish.
    const runs = await waitFor(`the ${CELLS} runs of the grid to finish`, async () => {
      const mine = (await runsOf(base, lab)).filter((r) => ids.has(r.id));
      const failed = mine.find((r) => r.status === 'failed');
      if (failed) throw new Error(`Run ${failed.name} failed: ${failed.statusReason}`);
      return mine.length === CELLS && mine.every((r) => r.status === 'finished') ? mine : null;
    }, 30 * 60_000, 2000);
    const cpu = process.cpuUsage(cpu0);
    const lastFinish = Math.max(...runs.map((r) => Date.parse(r.updatedAt)));
    const wallSeconds = (lastFinish - started) / 1000;
    // CPU seconds per wall second over the polled span (up to a second longer than the grid's own).
    const main1 = mainThreadCpuSeconds();
    return {
      startupSeconds, wallSeconds, coresBusy: (cpu.user + cpu.system) / 1e6 / ((performance.now() - t0) / 1000), cpuSeconds: (cpu.user + cpu.system) / 1e6,
      mainThreadCpuSeconds: main0 !== null && main1 !== null ? main1 - main0 : null,
    };
  } finally {
    await runner.stop();
  }
}

// The machine's ceiling first, while no server runs in this process.
const ceilingLoadBefore = loadavg();
const ceiling: CeilingResult | null = CEILING_STEPS > 0 ? await measureCeiling(CEILING_STEPS, ROUNDS) : null;
if (ceiling) {
  process.stdout.write(`ceiling: a bare training step takes ${ceiling.medianMsPerStepAlone} ms in one thread alone and ` +
    `${ceiling.medianMsPerStepTwoAtOnce} ms in each of two threads at once (${ceiling.speedUpCeiling}× at most from a second thread here; ` +
    `load average before ${ceilingLoadBefore.map((x) => x.toFixed(2)).join(' ')})\n`);
}

// BENCH_RUNNER_LOG=1 prints the server's request lines (to count the calls a grid makes).
const server = await startHarnessServer(process.env['BENCH_RUNNER_LOG'] ? { LOG_LEVEL: 'info' } : {});
try {
  const lab = await openLab(server.url);
  const token = await runnerToken(server.url, lab, 'bench');
  const loadBefore = loadavg();
  const measures: Record<1 | 2, Measure[]> = { 1: [], 2: [] };
  for (let round = 0; round < ROUNDS; round++) {
    for (const threads of round % 2 === 0 ? [1, 2] as const : [2, 1] as const) {
      const m = await measureGrid(server.url, lab, token, threads, round);
      measures[threads].push(m);
      process.stdout.write(`round ${round + 1}: ${threads} thread(s): ${m.wallSeconds.toFixed(1)} s for ${CELLS} runs of ${STEPS} steps ` +
        `(threads started in ${m.startupSeconds.toFixed(1)} s before), ` +
        `${m.coresBusy.toFixed(2)} cores busy on average, CPU ${m.cpuSeconds.toFixed(1)} s` +
        `${m.mainThreadCpuSeconds !== null ? ` (main thread: server and runner ${m.mainThreadCpuSeconds.toFixed(1)} s)` : ''}\n`);
    }
  }
  const r2 = (x: number) => Number(x.toFixed(2));
  /** One figure of every grid, per thread count (rounded to 2 decimals); a null figure (no /proc) is left out. */
  const each = (figure: (m: Measure) => number | null) => {
    const of = (k: 1 | 2) => measures[k].map(figure).filter((x): x is number => x !== null).map(r2);
    return { oneThread: of(1), twoThreads: of(2) };
  };
  const one = lowerMedian(measures[1].map((m) => m.wallSeconds));
  const two = lowerMedian(measures[2].map((m) => m.wallSeconds));
  const total = (k: 1 | 2) => lowerMedian(measures[k].map((m) => m.wallSeconds + m.startupSeconds));
  const result = {
    what: `${CELLS}-cell grid of ${STEPS}-step state-space runs (state 8, K 4, batch 32), embedded back-end, runner threads in one process`,
    measuredAt: new Date().toISOString(),
    cpu: cpus()[0]?.model ?? 'unknown', cores: availableParallelism(),
    loadAverageBefore: loadBefore.map(r2), loadAverageAfter: loadavg().map(r2),
    wallSeconds: each((m) => m.wallSeconds),
    medianWallSeconds: { oneThread: r2(one), twoThreads: r2(two) },
    /** CPU seconds of this process per wall second: how many cores the runs actually got. */
    coresUsed: each((m) => m.coresBusy),
    /** CPU seconds per grid: the whole process, and its main thread (server, runner main thread, the bench's polling). */
    cpuSeconds: each((m) => m.cpuSeconds),
    mainThreadCpuSeconds: each((m) => m.mainThreadCpuSeconds),
    speedUp: r2(one / two),
    target: 1.7,
    /** Seconds from starting the runner until its threads had loaded TF.js and the WASM backend (before each grid). */
    startupSeconds: each((m) => m.startupSeconds),
    /** The same comparison with each runner's start-up added to its grid (a runner started for one grid only). */
    speedUpWithStartup: r2(total(1) / total(2)),
    /**
     * The machine's ceiling (no server, no runner): ms per bare training step of these runs in one worker thread alone
     * and in each of two at once, one process; speedUpCeiling = 2 × alone / two-at-once. The grid's speed-up below it
     * is the runner's and the server's overhead; the ceiling below 2 is the machine's.
     */
    ceiling: ceiling ? { ...ceiling, loadAverageBefore: ceilingLoadBefore.map(r2) } : null,
    note: 'Wall time from creating the grid until the server recorded its last run as finished; the runner was started before ' +
      'and its threads had loaded (startupSeconds, also folded into speedUpWithStartup). Other processes shared the ' +
      'machine (see the load averages); when they keep both cores busy, a second thread gets no more CPU (coresUsed) and the ' +
      'speed-up cannot show.',
  };
  mkdirSync(join(root, 'bench', 'results'), { recursive: true });
  writeFileSync(join(root, 'bench', 'results', 'runners.json'), `${JSON.stringify(result, null, 2)}\n`);
  process.stdout.write(`1 thread: ${one.toFixed(1)} s, 2 threads: ${two.toFixed(1)} s, speed-up ${result.speedUp}× (target ≥ 1.7×; ` +
    `${result.speedUpWithStartup}× with the threads' start-up)` +
    `${ceiling ? `; the machine's ceiling ${ceiling.speedUpCeiling}× (bare step ${ceiling.medianMsPerStepAlone} ms alone, ${ceiling.medianMsPerStepTwoAtOnce} ms two at once)` : ''}; ` +
    `load average before ${result.loadAverageBefore.join(' ')}, after ${result.loadAverageAfter.join(' ')}\n` +
    `written to bench/results/runners.json\n`);
} finally {
  await server.stop();
}
