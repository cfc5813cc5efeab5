/**
 * The BullMQ back-end against a real redis-server (started here on a free loopback port, stopped afterwards):
 * one job per runner run (job id = run id) with the contract's options, fairness by priority, jobs withdrawn
 * when a run stops waiting, jobs re-added for waiting runs that lost theirs, and runs trained by a real
 * BullMQ Worker that claims each job's run through the REST API.
 */
import { Worker, type Job } from 'bullmq';
import { Redis } from 'ioredis';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../../shared/api/errors';
import { RUNNER_QUEUE_NAME, type RunnerJob, type RunnerQueueJobData } from '../../../../shared/api/runner-jobs';
import type { RunDto } from '../../../../shared/api/runs';
import { startTestRedis, type TestRedis } from '../../../testing/redis-server';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../../testing/test-app';
import { uploadCorpus } from '../../runs/runs-test-helpers';
import { ensureQueuedJobs } from '../runner-startup';
import { createRunnerRun, createRunnerToken, runnerCall } from '../runners-test-helpers';
import type { BullmqRunQueue } from './bullmq-run-queue';

let redis: TestRedis;
let t: TestApp;
let f: BenchFixture;
let token: string;
let queue: BullmqRunQueue['queue'];
const bench2: { id: string; corpusId: string } = { id: '', corpusId: '' };
let corpusId: string;

beforeAll(async () => {
  redis = await startTestRedis();
  t = await createTestApp({ QUEUE_URL: redis.url });
  f = await createBenchFixture(t);
  corpusId = (await uploadCorpus(t, f.benchId, f.tokens.member)).id;
  const b = await request(t.app).post('/api/benches').set(bearer(f.tokens.coach)).send({ name: 'Second bench' });
  bench2.id = b.body.id;
  bench2.corpusId = (await uploadCorpus(t, bench2.id, f.tokens.coach)).id;
  token = (await createRunnerToken(t, f.tokens.admin)).token;
  queue = (t.runQueue as BullmqRunQueue).queue;
}, 30_000);
afterAll(async () => {
  await t?.close();
  await redis?.stop();
});

describe('BullMQ queue of runner runs', () => {
  const a: RunDto[] = [];
  let b: RunDto;

  it('adds one job per run with the contract options and a priority that keeps a single run from waiting behind a grid', async () => {
    expect(t.runQueue.backend).toBe('bullmq');
    for (const name of ['A1', 'A2', 'A3']) {
      a.push(await createRunnerRun(t, f.benchId, f.tokens.member, corpusId, name));
      t.clock.advance(1000);
    }
    b = await createRunnerRun(t, bench2.id, f.tokens.coach, bench2.corpusId, 'B1');
    const jobs = await Promise.all([...a, b].map((r) => queue.getJob(r.id)));
    expect(jobs.map((j) => j?.name)).toEqual(['train', 'train', 'train', 'train']);
    expect(jobs.map((j) => j?.data)).toEqual([...a.map((r) => ({ runId: r.id, benchId: f.benchId })), { runId: b.id, benchId: bench2.id }]);
    expect(jobs.map((j) => j?.opts.priority)).toEqual([1, 2, 3, 1]);
    expect(jobs[0]!.opts).toMatchObject({ attempts: 20, backoff: { type: 'exponential', delay: 2000 }, removeOnComplete: true, removeOnFail: true });
    const status = await request(t.app).get(`/api/benches/${f.benchId}/runner-status`).set(bearer(f.tokens.viewer));
    expect(status.body).toMatchObject({ backend: 'bullmq', waiting: 3, active: 0 });
  });

  it('withdraws the job of a run that stops waiting, and re-adds jobs that went missing', async () => {
    const extra = await createRunnerRun(t, f.benchId, f.tokens.member, corpusId, 'A4');
    expect(await queue.getJob(extra.id)).toBeDefined();
    const stop = await request(t.app).post(`/api/benches/${f.benchId}/runs/${extra.id}/control`).set(bearer(f.tokens.member)).send({ action: 'stop' });
    expect(stop.body.status).toBe('stopped');
    expect(await queue.getJob(extra.id)).toBeUndefined();
    const refused = await runnerCall(t, token).claim(extra.id);
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe(ErrorCode.RunNotQueued);

    await (await queue.getJob(a[2]!.id))!.remove();
    expect(await ensureQueuedJobs(t.orm, t.runQueue)).toBe(1);
    expect((await queue.getJob(a[2]!.id))?.opts.priority).toBe(3);
    expect(await ensureQueuedJobs(t.orm, t.runQueue)).toBe(0);
  });

  it('lets a BullMQ worker claim each job’s run by id and train them in fair order', async () => {
    const order: string[] = [];
    const runner = runnerCall(t, token);
    const connection = new Redis(redis.url, { maxRetriesPerRequest: null });
    const worker = new Worker<RunnerQueueJobData>(
      RUNNER_QUEUE_NAME,
      async (job: Job<RunnerQueueJobData>) => {
        const claim = await runner.claim(job.data.runId);
        if (claim.status !== 200) throw new Error(`claim answered ${claim.status}`);
        const spec = claim.body as RunnerJob;
        order.push(spec.runName);
        await runner.progress(spec.runId, { step: 5, steps: 10, stepsPerSecond: 1, bitsPerChar: 3, isBound: true });
        await runner.finish(spec.runId, { status: 'finished', stepsDone: 10 });
      },
      { connection, concurrency: 1, lockDuration: 30_000, stalledInterval: 15_000, maxStalledCount: 10 },
    );
    try {
      for (let i = 0; i < 100 && order.length < 4; i++) await new Promise((done) => setTimeout(done, 50));
    } finally {
      await worker.close();
      await connection.quit();
    }
    // Same priority goes in the order added: A1 (priority 1), B1 (1), A2 (2), A3 (3).
    expect(order).toEqual(['A1', 'B1', 'A2', 'A3']);
    const runs = await request(t.app).get(`/api/benches/${f.benchId}/runs?status=finished`).set(bearer(f.tokens.viewer));
    expect(runs.body.total).toBe(3);
    expect(await queue.getJobCounts('waiting', 'prioritized', 'active')).toEqual({ waiting: 0, prioritized: 0, active: 0 });
  }, 20_000);
});
