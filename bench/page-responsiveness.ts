/**
 * `npm run bench:page`: how free the page's main thread stays while a run trains in a web worker. Runs the
 * end-to-end training story (tests/e2e/training.e2e.ts, Debian Chromium) BENCH_RUNS times (default 5); each run
 * records the main thread's long tasks (over 50 ms) from step 20 until the Stop click. Reports how many runs had
 * none, the longest task seen, and every run's figures; writes bench/results/page.json. Needs a built app
 * (`npm run bench:page` builds it first).
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';

interface RunRecord { windowMs: number; longTasks: number[]; maxTaskMs: number; slowFrames: string[]; workerThreadsAtNice19: number }

const RUNS = Number(process.env['BENCH_RUNS'] ?? 5);
const dir = mkdtempSync(join(tmpdir(), 'noisewright-page-bench-'));
const runs: RunRecord[] = [];
const startLoad = loadavg()[0];
for (let i = 1; i <= RUNS; i++) {
  const file = join(dir, `run-${i}.json`);
  const result = spawnSync(process.execPath, ['--import', 'tsx', '--test', 'tests/e2e/training.e2e.ts'], {
    env: { ...process.env, TRAINING_LONG_TASKS_FILE: file }, encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'],
  });
  if (result.status !== 0) {
    process.stderr.write(result.stdout.slice(-4000));
    throw new Error(`Run ${i}: the training story itself failed (exit ${result.status}); fix that first.`);
  }
  const record = JSON.parse(readFileSync(file, 'utf8')) as RunRecord;
  runs.push(record);
  process.stderr.write(`run ${i}: window ${record.windowMs} ms, long tasks ${JSON.stringify(record.longTasks)}\n`);
}
const clean = runs.filter((r) => r.longTasks.length === 0).length;
const all = runs.flatMap((r) => r.longTasks);
const summary = {
  createdAt: new Date().toISOString(),
  machine: { cpu: cpus()[0]?.model ?? 'unknown', cores: cpus().length, node: process.version, loadAverage: [startLoad, loadavg()[0]] },
  limitMs: 50, runs: RUNS, runsWithoutLongTasks: clean, longTasks: all, maxTaskMs: Math.max(0, ...all),
  meanWindowMs: Math.round(runs.reduce((a, r) => a + r.windowMs, 0) / RUNS), perRun: runs,
  notes: 'Long tasks of the page main thread from step 20 to the Stop click of the e2e training story (training, save by hand, pause, resume).',
};
mkdirSync('bench/results', { recursive: true });
writeFileSync('bench/results/page.json', `${JSON.stringify(summary, null, 1)}\n`);
console.log(`${clean} of ${RUNS} runs had no main-thread task over 50 ms while training (windows of ~${summary.meanWindowMs} ms);`);
console.log(`long tasks seen: ${all.length ? all.join(', ') + ' ms' : 'none'}. Wrote bench/results/page.json`);
