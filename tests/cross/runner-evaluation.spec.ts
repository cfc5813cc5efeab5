/**
 * An evaluation sent to runners, end to end with real parts: the server on the embedded back-end, the runner
 * program's threads (`startRunnerThreads`), a run they train, then an evaluation request for its checkpoint. The
 * runner computes it through the runner routes only; the stored figures must equal, figure for figure, what
 * `runEvaluationJob` (shared/training/evaluation-job.ts, the tab's evaluation job) computes here for the same
 * checkpoint, corpus words, split and settings (same seed → same figures).
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

beforeAll(async () => {
  server = await startHarnessServer();
  lab = await openLab(server.url);
  runner = startRunnerThreads({ serverUrl: server.url, token: await runnerToken(server.url, lab, 'evaluator'), threads: 1, name: 'evaluator', output: quiet });
}, 60_000);

afterAll(async () => {
  await runner?.stop();
  await server?.stop();
}, 90_000);

describe('an evaluation on a runner', () => {
  it('stores the figures the tab’s evaluation job computes for the same checkpoint and settings', async () => {
    const run = await api<RunDto>(server.url, `/benches/${lab.benchId}/runs`, lab.token,
      json({ family: 'ssm', name: 'to evaluate', corpusId: lab.corpusId, settings: tinySettings(20, 10), placement: 'runners' }));
    const trained = await waitFor('the run to finish', async () => {
      const r = await api<RunDto>(server.url, `/benches/${lab.benchId}/runs/${run.id}`, lab.token);
      return r.status === 'finished' || r.status === 'failed' ? r : null;
    }, 120_000);
    expect(trained.status, trained.statusReason ?? '').toBe('finished');
    const { dto: checkpoint, bytes } = await latestCheckpointBytes(server.url, lab, run.id);

    // Small settings so the evaluation takes seconds; a seed other than the default.
    const input = { K: 8, repeats: 2, S: 32, crossEntropyK: 4, M: 8, sampleCount: 40, detailWords: 5, maxHeldOut: 40, tMax: 8, particles: 16, seed: 7, heldOutSplit: 'validation', ngramOrder: 2 };
    const url = `/benches/${lab.benchId}/runs/${run.id}/checkpoints/${checkpoint.id}/evaluation-requests`;
    const asked = await api<EvaluationRequestDto>(server.url, url, lab.token, json({ settings: input }));
    expect(asked.status).toBe('waiting');
    const done = await waitFor('the evaluation to land', async () => {
      const r = await api<EvaluationRequestDto>(server.url, `/benches/${lab.benchId}/evaluation-requests/${asked.id}`, lab.token);
      return r.status === 'finished' || r.status === 'failed' ? r : null;
    }, 120_000, 200);
    expect(done.status, done.statusReason ?? '').toBe('finished');
    const stored = await api<EvaluationDto>(server.url, `/benches/${lab.benchId}/evaluations/${done.evaluationId}`, lab.token);
    expect(stored.settings).toEqual(evaluationSettingsSchema.parse(input));

    await initNodeBackend('wasm');
    const settings = evaluationSettingsSchema.parse(input);
    const corpus = await api<TrainingSet>(server.url, `/benches/${lab.benchId}/corpora/${lab.corpusId}/training-set`, lab.token);
    const here = runEvaluationJob({
      checkpoint: bytes, corpus, split: trained.settings.split ?? null, heldOutSplit: settings.heldOutSplit, ngramOrder: settings.ngramOrder,
      settings: toReportSettings(settings), gruCheckpoint: null,
    });
    expect(stored.results.family).toBe('ssm');
    // Stored figures went through JSON once; compare like with like.
    expect(stored.results).toEqual(JSON.parse(JSON.stringify(here)));
    expect(stored.headline.bitsPerWord).toBeGreaterThan(stored.headline.bitsPerChar);
  }, 300_000);
});
