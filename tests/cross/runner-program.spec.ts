/**
 * The runner program against the real server on the embedded back-end (no QUEUE_URL): `startRunnerThreads`
 * claims runner runs through `/api/runner/claim`, trains them in worker threads and reports through the runner
 * routes only. Checks: two runs train at once and finish with a whole training curve and a final checkpoint that
 * decodes; a stop sent from the run's page reaches the runner and ends the run as `stopped` with a checkpoint;
 * `stop()` of the runner (what SIGINT/SIGTERM do) hands a run back as `queued` with a checkpoint, and another
 * runner resumes it from there to the end without a gap or a repeated step in the curve.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RunDto } from '../../shared/api/runs';
import { decodeCheckpoint } from '../../shared/model/checkpoint';
import { startRunnerThreads, type RunnerHandle } from '../../runner/runner';
import {
  api, json, latestCheckpointBytes, openLab, runnerToken, startHarnessServer, tinySettings, trainSteps, waitFor,
  type HarnessServer, type Lab,
} from './support/runner-harness';

const quiet = { write: () => true, isTTY: false };
let server: HarnessServer;
let lab: Lab;
let token: string;
const handles: RunnerHandle[] = [];

beforeAll(async () => {
  server = await startHarnessServer();
  lab = await openLab(server.url);
  token = await runnerToken(server.url, lab, 'test-runner');
}, 60_000);

afterAll(async () => {
  await Promise.all(handles.map((h) => h.stop()));
  await server?.stop();
}, 90_000);

async function createRun(name: string, steps: number, checkpointEvery: number): Promise<RunDto> {
  return api<RunDto>(server.url, `/benches/${lab.benchId}/runs`, lab.token,
    json({ family: 'ssm', name, corpusId: lab.corpusId, settings: tinySettings(steps, checkpointEvery), placement: 'runners' }));
}

const getRun = (id: string) => api<RunDto>(server.url, `/benches/${lab.benchId}/runs/${id}`, lab.token);
const statusIs = (id: string, ...wanted: RunDto['status'][]) => async () => {
  const run = await getRun(id);
  return wanted.includes(run.status) ? run : null;
};

function expectWholeCurve(steps: number[], from: number, to: number, every: number): void {
  expect(steps[0]).toBeLessThanOrEqual(from + every);
  expect(steps.at(-1)).toBe(to);
  for (let i = 1; i < steps.length; i++) {
    expect(steps[i]! - steps[i - 1]!, `steps ${steps[i - 1]} → ${steps[i]}`).toBeGreaterThan(0);
    expect(steps[i]! - steps[i - 1]!, `steps ${steps[i - 1]} → ${steps[i]}`).toBeLessThanOrEqual(every);
  }
}

describe('runner program on the embedded back-end', () => {
  it('trains two runs at once to the end, with whole curves and final checkpoints that decode', async () => {
    const a = await createRun('embedded a', 80, 10);
    const b = await createRun('embedded b', 80, 10);
    const runner = startRunnerThreads({ serverUrl: server.url, token, threads: 2, name: 'two-threads', output: quiet });
    handles.push(runner);
    try {
      // Both held at the same time: one job per thread.
      await waitFor('both runs training at once', async () => {
        const [ra, rb] = await Promise.all([getRun(a.id), getRun(b.id)]);
        return ra.status === 'training' && rb.status === 'training' && ra.runner?.name === 'two-threads' && rb.runner?.name === 'two-threads';
      }, 90_000, 100);
      for (const run of [a, b]) {
        const done = await waitFor(`${run.name} to finish`, statusIs(run.id, 'finished', 'failed'), 120_000);
        expect(done.status, done.statusReason ?? '').toBe('finished');
        expect(done.stepsDone).toBe(80);
        // The final validation is summarised per char and per word (a word has at least its end-of-word symbol).
        expect(done.summary.bestValidationBitsPerWord).toBeGreaterThanOrEqual(done.summary.bestValidationBitsPerChar ?? Infinity);
        expectWholeCurve(await trainSteps(server.url, lab, run.id), 0, 80, 10);
        const { bytes } = await latestCheckpointBytes(server.url, lab, run.id);
        expect(decodeCheckpoint(bytes).step).toBe(80);
      }
    } finally {
      await runner.stop();
    }
  }, 200_000);

  it('stops a run on request from the page, and hands a run back on shutdown for another runner to resume', async () => {
    const first = startRunnerThreads({ serverUrl: server.url, token, threads: 1, name: 'first', output: quiet });
    handles.push(first);
    const stopped = await createRun('stopped from the page', 5000, 20);
    await waitFor('the run to pass step 25', async () => (await getRun(stopped.id)).stepsDone >= 25, 90_000, 100);
    await api<RunDto>(server.url, `/benches/${lab.benchId}/runs/${stopped.id}/control`, lab.token, json({ action: 'stop' }));
    const ended = await waitFor('the stop to reach the runner', statusIs(stopped.id, 'stopped', 'failed'), 30_000);
    expect(ended.status).toBe('stopped');
    expect(ended.stepsDone).toBeLessThan(5000);
    const { dto } = await latestCheckpointBytes(server.url, lab, stopped.id);
    expect(dto.step).toBe(ended.stepsDone);

    // Long enough that the shutdown lands mid-run even on a fast machine (a tiny step takes a few ms).
    const handed = await createRun('handed back', 1000, 10);
    await waitFor('the second run to pass step 25', async () => (await getRun(handed.id)).stepsDone >= 25, 90_000, 100);
    await first.stop();
    const back = await getRun(handed.id);
    expect(back.status).toBe('queued');
    const saved = await latestCheckpointBytes(server.url, lab, handed.id);
    expect(saved.dto.step).toBe(back.stepsDone);

    const second = startRunnerThreads({ serverUrl: server.url, token, threads: 1, name: 'second', output: quiet });
    handles.push(second);
    const done = await waitFor('the handed-back run to finish on the second runner', statusIs(handed.id, 'finished', 'failed'), 120_000);
    expect(done.status, done.statusReason ?? '').toBe('finished');
    expectWholeCurve(await trainSteps(server.url, lab, handed.id), 0, 1000, 10);
    expect(decodeCheckpoint((await latestCheckpointBytes(server.url, lab, handed.id)).bytes).step).toBe(1000);
    await second.stop();
  }, 300_000);
});
