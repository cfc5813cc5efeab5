/**
 * An evaluation sent to runners, end to end with real parts: the server on the embedded back-end, the runner
 * program's threads (`startRunnerThreads`), a run they train, then an evaluation request for its checkpoint. The
 * runner computes it through the runner routes only; the stored figures must equal, figure for figure, what
 * `runEvaluationJob` (shared/training/evaluation-job.ts, the tab's evaluation job) computes here for the same
 * checkpoint, corpus words, split and settings (same seed → same figures). A runner that shuts down mid-evaluation
 * gives the request back, and another runner computes it to the same figures.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { EvaluationRequestDto } from '../../shared/api/evaluation-jobs';
import { evaluationSettingsSchema, toReportSettings, type EvaluationDto } from '../../shared/api/evaluations';
import type { RunDto, TrainingSet } from '../../shared/api/runs';
import { initNodeBackend } from '../../shared/node/tf-node';
import { runEvaluationJob } from '../../shared/training/evaluation-job';
import { startRunnerThreads, type RunnerHandle } from '../../runner/runner';
import {
  api, json, latestCheckpointBytes, openLab, runnerToken, startHarnessServer, tinySettings, waitFor, type HarnessServer, type Lab,
} from './support/runner-harness';

const quiet = { write: () => true, isTTY: false };
let server: HarnessServer;
let lab: Lab;
let runner: RunnerHandle | null = null;
const others: RunnerHandle[] = [];
/** The run trained in the first test, its checkpoint and the corpus as the tab gets it. */
let trained: RunDto;
let checkpointId = '';
let checkpointBytes: Uint8Array = new Uint8Array();

const requestOf = (id: string) => api<EvaluationRequestDto>(server.url, `/benches/${lab.benchId}/evaluation-requests/${id}`, lab.token);
const ended = (id: string) => async () => {
  const r = await requestOf(id);
  return r.status === 'finished' || r.status === 'failed' ? r : null;
};

/** What the tab's evaluation job computes for the trained checkpoint with these settings (through JSON, as stored). */
async function tabFigures(input: Record<string, unknown>): Promise<unknown> {
  await initNodeBackend('wasm');
  const settings = evaluationSettingsSchema.parse(input);
  const corpus = await api<TrainingSet>(server.url, `/benches/${lab.benchId}/corpora/${lab.corpusId}/training-set`, lab.token);
  return JSON.parse(JSON.stringify(runEvaluationJob({
    checkpoint: checkpointBytes, corpus, split: trained.settings.split ?? null, heldOutSplit: settings.heldOutSplit, ngramOrder: settings.ngramOrder,
    settings: toReportSettings(settings), gruCheckpoint: null,
  })));
}

beforeAll(async () => {
  server = await startHarnessServer();
  lab = await openLab(server.url);
  runner = startRunnerThreads({ serverUrl: server.url, token: await runnerToken(server.url, lab, 'evaluator'), threads: 1, name: 'evaluator', output: quiet });
}, 60_000);

afterAll(async () => {
  await runner?.stop();
  await Promise.all(others.map((h) => h.stop()));
  await server?.stop();
}, 90_000);

describe('an evaluation on a runner', () => {
  it('stores the figures the tab’s evaluation job computes for the same checkpoint and settings', async () => {
    const run = await api<RunDto>(server.url, `/benches/${lab.benchId}/runs`, lab.token,
      json({ family: 'ssm', name: 'to evaluate', corpusId: lab.corpusId, settings: tinySettings(20, 10), placement: 'runners' }));
    trained = await waitFor('the run to finish', async () => {
      const r = await api<RunDto>(server.url, `/benches/${lab.benchId}/runs/${run.id}`, lab.token);
      return r.status === 'finished' || r.status === 'failed' ? r : null;
    }, 120_000);
    expect(trained.status, trained.statusReason ?? '').toBe('finished');
    const latest = await latestCheckpointBytes(server.url, lab, run.id);
    checkpointId = latest.dto.id;
    checkpointBytes = latest.bytes;

    // Small settings so the evaluation takes seconds; a seed other than the default.
    const input = { K: 8, repeats: 2, S: 32, crossEntropyK: 4, M: 8, sampleCount: 40, detailWords: 5, maxHeldOut: 40, tMax: 8, particles: 16, seed: 7, heldOutSplit: 'validation', ngramOrder: 2 };
    const url = `/benches/${lab.benchId}/runs/${run.id}/checkpoints/${checkpointId}/evaluation-requests`;
    const asked = await api<EvaluationRequestDto>(server.url, url, lab.token, json({ settings: input }));
    expect(asked.status).toBe('waiting');
    const done = await waitFor('the evaluation to land', ended(asked.id), 120_000, 200);
    expect(done.status, done.statusReason ?? '').toBe('finished');
    const stored = await api<EvaluationDto>(server.url, `/benches/${lab.benchId}/evaluations/${done.evaluationId}`, lab.token);
    expect(stored.settings).toEqual(evaluationSettingsSchema.parse(input));
    expect(stored.results.family).toBe('ssm');
    expect(stored.results).toEqual(await tabFigures(input));
    expect(stored.headline.bitsPerWord).toBeGreaterThan(stored.headline.bitsPerChar);
  }, 300_000);

  it('gives the request back when its runner shuts down mid-evaluation; the next runner stores the same figures', async () => {
    await runner?.stop();
    runner = null;
    const first = startRunnerThreads({ serverUrl: server.url, token: await runnerToken(server.url, lab, 'first'), threads: 1, name: 'first', output: quiet });
    others.push(first);
    await first.ready();
    // Larger budgets, so the evaluation is still computing when the runner is told to stop.
    const input = { K: 1024, repeats: 3, S: 4096, crossEntropyK: 16, M: 64, sampleCount: 1000, detailWords: 10, maxHeldOut: 200, tMax: 10, particles: 64, seed: 8 };
    const asked = await api<EvaluationRequestDto>(server.url, `/benches/${lab.benchId}/runs/${trained.id}/checkpoints/${checkpointId}/evaluation-requests`,
      lab.token, json({ settings: input }));
    await waitFor('the first runner to hold the request', async () => (await requestOf(asked.id)).status === 'running', 30_000, 50);
    await first.stop();
    const back = await requestOf(asked.id);
    expect(back).toMatchObject({ status: 'waiting', runnerName: null, evaluationId: null });

    const second = startRunnerThreads({ serverUrl: server.url, token: await runnerToken(server.url, lab, 'second'), threads: 1, name: 'second', output: quiet });
    others.push(second);
    const done = await waitFor('the second runner to store the figures', ended(asked.id), 240_000, 250);
    expect(done.status, done.statusReason ?? '').toBe('finished');
    const stored = await api<EvaluationDto>(server.url, `/benches/${lab.benchId}/evaluations/${done.evaluationId}`, lab.token);
    expect(stored.results).toEqual(await tabFigures(input));
  }, 300_000);
});
