/**
 * An evaluation sent to runners on the BullMQ back-end, with real parts: a private redis-server (free loopback
 * port, temp folder), the server with QUEUE_URL, and the runner program's threads consuming the queue. The
 * request becomes one `evaluate` job (job id = request id) in the runs' queue, waits there while no runner runs,
 * and a runner started later computes it; the stored figures equal the tab's evaluation job's for the same
 * checkpoint and settings.
 */
import { Queue } from 'bullmq';
import { Redis } from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { EVALUATION_JOB_NAME, type EvaluationRequestDto } from '../../shared/api/evaluation-jobs';
import { evaluationSettingsSchema, toReportSettings, type EvaluationDto } from '../../shared/api/evaluations';
import { RUNNER_QUEUE_NAME } from '../../shared/api/runner-jobs';
import type { RunDto, TrainingSet } from '../../shared/api/runs';
import { initNodeBackend } from '../../shared/node/tf-node';
import { runEvaluationJob } from '../../shared/training/evaluation-job';
import { startRunnerThreads, type RunnerHandle } from '../../runner/runner';
import {
  api, json, latestCheckpointBytes, openLab, runnerToken, startHarnessServer, startRedis, tinySettings, waitFor,
  type HarnessServer, type Lab, type RedisProcess,
} from './support/runner-harness';

const quiet = { write: () => true, isTTY: false };
let redis: RedisProcess;
let server: HarnessServer;
let lab: Lab;
let token: string;
const handles: RunnerHandle[] = [];

beforeAll(async () => {
  redis = await startRedis();
  server = await startHarnessServer({ QUEUE_URL: redis.url });
  lab = await openLab(server.url);
  token = await runnerToken(server.url, lab, 'queue-evaluator');
}, 60_000);

afterAll(async () => {
  await Promise.all(handles.map((h) => h.stop()));
  await server?.stop();
  await redis?.stop();
}, 90_000);

const start = () => {
  const h = startRunnerThreads({ serverUrl: server.url, token, threads: 1, name: 'queue-evaluator', queueUrl: redis.url, output: quiet });
  handles.push(h);
  return h;
};

describe('an evaluation on a BullMQ runner', () => {
  it('queues an evaluate job with the request id, and a runner started later stores the tab’s figures', async () => {
    const first = start();
    const run = await api<RunDto>(server.url, `/benches/${lab.benchId}/runs`, lab.token,
      json({ family: 'ssm', name: 'queued evaluation', corpusId: lab.corpusId, settings: tinySettings(20, 10), placement: 'runners' }));
    const trained = await waitFor('the run to finish', async () => {
      const r = await api<RunDto>(server.url, `/benches/${lab.benchId}/runs/${run.id}`, lab.token);
      return r.status === 'finished' || r.status === 'failed' ? r : null;
    }, 120_000);
    expect(trained.status, trained.statusReason ?? '').toBe('finished');
    await first.stop();

    const { dto: checkpoint, bytes } = await latestCheckpointBytes(server.url, lab, run.id);
    const input = { K: 8, repeats: 2, S: 32, crossEntropyK: 0, M: 8, sampleCount: 30, detailWords: 4, maxHeldOut: 30, tMax: 8, particles: 16, seed: 9 };
    const asked = await api<EvaluationRequestDto>(server.url, `/benches/${lab.benchId}/runs/${run.id}/checkpoints/${checkpoint.id}/evaluation-requests`,
      lab.token, json({ settings: input }));
    const connection = new Redis(redis.url, { maxRetriesPerRequest: null });
    const queue = new Queue(RUNNER_QUEUE_NAME, { connection });
    try {
      const job = await queue.getJob(asked.id);
      expect(job?.name).toBe(EVALUATION_JOB_NAME);
      expect(job?.data).toEqual({ requestId: asked.id, runId: run.id, benchId: lab.benchId });
    } finally {
      await queue.close();
      await connection.quit();
    }
    expect((await api<EvaluationRequestDto>(server.url, `/benches/${lab.benchId}/evaluation-requests/${asked.id}`, lab.token)).status).toBe('waiting');

    start();
    const done = await waitFor('the evaluation to land', async () => {
      const r = await api<EvaluationRequestDto>(server.url, `/benches/${lab.benchId}/evaluation-requests/${asked.id}`, lab.token);
      return r.status === 'finished' || r.status === 'failed' ? r : null;
    }, 120_000, 200);
    expect(done.status, done.statusReason ?? '').toBe('finished');
    const stored = await api<EvaluationDto>(server.url, `/benches/${lab.benchId}/evaluations/${done.evaluationId}`, lab.token);

    await initNodeBackend('wasm');
    const settings = evaluationSettingsSchema.parse(input);
    const corpus = await api<TrainingSet>(server.url, `/benches/${lab.benchId}/corpora/${lab.corpusId}/training-set`, lab.token);
    const here = runEvaluationJob({
      checkpoint: bytes, corpus, split: trained.settings.split ?? null, heldOutSplit: settings.heldOutSplit, ngramOrder: settings.ngramOrder,
      settings: toReportSettings(settings),
    });
    expect(stored.results).toEqual(JSON.parse(JSON.stringify(here)));
  }, 300_000);
});
