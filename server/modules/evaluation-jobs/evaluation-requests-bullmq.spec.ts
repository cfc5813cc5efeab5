/**
 * Evaluation requests on the BullMQ back-end against a real redis-server (free loopback port, stopped afterwards):
 * a request becomes one `evaluate` job in the runs' queue (job id = request id), a claim by id takes it, a
 * request given back gets its job again, and the server's queue check re-adds the job of a waiting request that
 * lost it.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { EvaluationRequestDto } from '../../../shared/api/evaluation-jobs';
import type { CheckpointDto, RunDto } from '../../../shared/api/runs';
import { startTestRedis, type TestRedis } from '../../testing/redis-server';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import type { BullmqRunQueue } from '../runners/queue/bullmq-run-queue';
import { ensureQueuedJobs } from '../runners/runner-startup';
import { createRunnerToken } from '../runners/runners-test-helpers';
import { createRun, ssmCheckpointBytes, ssmRunBody, uploadCorpus } from '../runs/runs-test-helpers';

let redis: TestRedis;
let t: TestApp;
let f: BenchFixture;
let run: RunDto;
let checkpoint: CheckpointDto;
let token: string;
let queue: BullmqRunQueue['queue'];

beforeAll(async () => {
  redis = await startTestRedis();
  t = await createTestApp({ QUEUE_URL: redis.url });
  f = await createBenchFixture(t);
  const corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Tab SSM'));
  checkpoint = (await request(t.app).post(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints?reason=manual`).set(bearer(f.tokens.member))
    .set('Content-Type', 'application/octet-stream').send(Buffer.from(ssmCheckpointBytes(corpus.alphabet, { step: 60 })))).body as CheckpointDto;
  token = (await createRunnerToken(t, f.tokens.admin)).token;
  queue = (t.runQueue as BullmqRunQueue).queue;
}, 30_000);
afterAll(async () => {
  await t?.close();
  await redis?.stop();
});

describe('BullMQ jobs of evaluation requests', () => {
  it('adds an evaluate job per request, gives it again after a hand-back, and re-adds one that went missing', async () => {
    const asked = (await request(t.app).post(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints/${checkpoint.id}/evaluation-requests`)
      .set(bearer(f.tokens.member)).send({ settings: { K: 64 } })).body as EvaluationRequestDto;
    const job = await queue.getJob(asked.id);
    expect(job?.name).toBe('evaluate');
    expect(job?.data).toEqual({ requestId: asked.id, runId: run.id, benchId: f.benchId });
    expect(job?.opts).toMatchObject({ attempts: 20, backoff: { type: 'exponential', delay: 2000 }, removeOnComplete: true, removeOnFail: true });

    const claim = await request(t.app).post('/api/runner/evaluations/claim').set(bearer(token)).send({ requestId: asked.id });
    expect(claim.status).toBe(200);
    await job!.remove();
    // Held: nothing to re-add.
    expect(await ensureQueuedJobs(t.orm, t.runQueue)).toBe(0);
    const back = await request(t.app).post(`/api/runner/evaluations/${asked.id}/end`).set(bearer(token)).send({ status: 'waiting' });
    expect(back.status).toBe(200);
    expect((await queue.getJob(asked.id))?.name).toBe('evaluate');

    await (await queue.getJob(asked.id))!.remove();
    expect(await ensureQueuedJobs(t.orm, t.runQueue)).toBe(1);
    expect((await queue.getJob(asked.id))?.data).toEqual({ requestId: asked.id, runId: run.id, benchId: f.benchId });
    expect(await ensureQueuedJobs(t.orm, t.runQueue)).toBe(0);
  });
});
