/**
 * The embedded back-end end to end, through the REST API: a run sent to runners is claimed, reports progress,
 * metrics and checkpoints, survives a server restart (its threads' runs go back to the queue and resume from the
 * latest checkpoint, with later metric points removed), and finishes.
 */
import request from 'supertest';
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RUNNER_TOKEN_PATTERN, type RunnerJob } from '../../../shared/api/runner-jobs';
import type { RunnerAvailability, RunnersOverview } from '../../../shared/api/runners';
import type { RunDto } from '../../../shared/api/runs';
import { createApp } from '../../app';
import { openDatabase, type Orm } from '../../db/orm';
import { mailboxMailer } from '../mail/mailer';
import { Mailbox } from '../mail/mailbox';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { binaryBody, ssmCheckpointBytes, uploadCorpus } from '../runs/runs-test-helpers';
import { EmbeddedRunQueue } from './queue/run-queue';
import { RunEventBus } from './run-events';
import { prepareEmbeddedRunner } from './runner-startup';
import { createRunnerRun, createRunnerToken, metricSteps, progressAt, runnerCall } from './runners-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpus: { id: string; alphabet: string[] };
/** The database opened by the simulated restart (closed here; the harness closes the first one). */
let reopened: Orm | null = null;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
});
afterAll(async () => {
  await reopened?.close(true);
  await t.close();
});

const benchUrl = () => `/api/benches/${f.benchId}`;

describe('runner tokens (admin)', () => {
  it('creates a token shown once and stores only its SHA-256 hash', async () => {
    const created = await createRunnerToken(t, f.tokens.admin, 'Attic tower');
    expect(created.token).toMatch(RUNNER_TOKEN_PATTERN);
    expect(created.runner).toMatchObject({ name: 'Attic tower', kind: 'remote', online: false, revokedAt: null, jobsDone: 0 });
    const rows: { token_hash: string }[] = await t.orm.em.fork().getConnection().execute('select token_hash from runners where id = ?', [created.runner.id]);
    // Hash computed here with node:crypto, the reference SHA-256 implementation of Node (OpenSSL).
    expect(rows[0]!.token_hash).toBe(createHash('sha256').update(created.token).digest('hex'));
    const list = await request(t.app).get('/api/runners').set(bearer(f.tokens.admin));
    expect(list.status).toBe(200);
    expect(JSON.stringify(list.body)).not.toContain(created.token);
    expect((list.body as RunnersOverview).backend).toBe('embedded');
  });

  it('lets only the instance admin list, create and revoke runners', async () => {
    for (const who of ['owner', 'member'] as const) {
      expect((await request(t.app).get('/api/runners').set(bearer(f.tokens[who]))).status).toBe(403);
      expect((await request(t.app).post('/api/runners').set(bearer(f.tokens[who])).send({ name: 'Mine' })).status).toBe(403);
    }
    const bad = await request(t.app).post('/api/runners').set(bearer(f.tokens.admin)).send({ name: '   ' });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fields.name).toMatch(/Name the runner/);
  });
});

describe('a run trained by the embedded runner, across a server restart', () => {
  it('claims, reports, checkpoints, resumes after a restart from the latest checkpoint, and finishes', async () => {
    const run = await createRunnerRun(t, f.benchId, f.tokens.member, corpus.id, 'Sent away');
    expect(run).toMatchObject({ status: 'queued', placement: 'runners', runner: null, live: null });
    const status = await request(t.app).get(`${benchUrl()}/runner-status`).set(bearer(f.tokens.viewer));
    expect(status.body as RunnerAvailability).toEqual({ backend: 'embedded', onlineRunners: 0, onlineThreads: 0, waiting: 1, active: 0, canSend: false });

    const first = await prepareEmbeddedRunner(t.orm, t.clock);
    const r1 = runnerCall(t, first.token);
    expect((await r1.heartbeat({ threads: 2, jobs: [] })).body).toEqual({ controls: [] });
    const claim = await r1.claim();
    expect(claim.status).toBe(200);
    const job = claim.body as RunnerJob;
    expect(job).toMatchObject({ runId: run.id, benchId: f.benchId, family: 'ssm', stepsDone: 0, checkpoint: null, leaseSeconds: 45, progressEverySeconds: 2 });
    expect(job.alphabet).toEqual(corpus.alphabet);
    expect((await r1.claim()).status).toBe(204);

    const words = await r1.trainingSet(run.id);
    expect(words.status).toBe(200);
    expect(words.body.words).toContain('abba');
    expect(words.body.splits.length).toBe(words.body.words.length);

    expect((await r1.progress(run.id, progressAt(100))).body).toEqual({ action: 'continue' });
    expect((await r1.metrics(run.id, [100, 110, 120, 130, 140].map((step) => ({ series: 'train_bound', step, value: 3 - step / 1000 })))).status).toBe(201);
    const saved = await r1.uploadCheckpoint(run.id, ssmCheckpointBytes(corpus.alphabet, { step: 120 }));
    expect(saved.status).toBe(201);
    expect(saved.body.step).toBe(120);
    await r1.progress(run.id, progressAt(140));

    const seen = await request(t.app).get(`${benchUrl()}/runs/${run.id}`).set(bearer(f.tokens.viewer));
    expect(seen.body as RunDto).toMatchObject({ status: 'training', stepsDone: 140, placement: 'runners', runner: { name: 'This server' } });
    expect(seen.body.live).toMatchObject({ step: 140, steps: 200, stepsPerSecond: 4, etaSeconds: 15, bitsPerChar: 3.1, isBound: true, runnerName: 'This server' });
    const online = await request(t.app).get(`${benchUrl()}/runner-status`).set(bearer(f.tokens.member));
    expect(online.body).toMatchObject({ onlineRunners: 1, onlineThreads: 2, waiting: 0, active: 1, canSend: true });

    // Restart: a second app on the same database file; the old threads are gone, so their run goes back to the queue.
    await t.orm.close(true);
    reopened = await openDatabase(t.config.databasePath);
    t.orm = reopened;
    t.app = createApp(t.config, { orm: t.orm, mailer: mailboxMailer(new Mailbox(), t.config.mailFrom), clock: t.clock, runQueue: new EmbeddedRunQueue(), runEvents: new RunEventBus() });
    const second = await prepareEmbeddedRunner(t.orm, t.clock);
    expect(second.released).toBe(1);
    expect((await runnerCall(t, first.token).heartbeat({ threads: 2, jobs: [] })).status).toBe(401);
    const r2 = runnerCall(t, second.token);
    const resumed = (await r2.claim()).body as RunnerJob;
    expect(resumed).toMatchObject({ runId: run.id, stepsDone: 120, checkpoint: { id: saved.body.id, step: 120 } });
    expect(await metricSteps(t, run.id)).toEqual([100, 110, 120]);
    const bytes = await r2.checkpoint(run.id).buffer(true).parse(binaryBody);
    expect(bytes.status).toBe(200);
    expect(bytes.headers['x-checkpoint-step']).toBe('120');
    expect(Buffer.compare(bytes.body as Buffer, Buffer.from(ssmCheckpointBytes(corpus.alphabet, { step: 120 })))).toBe(0);

    await r2.progress(run.id, progressAt(130));
    await r2.metrics(run.id, [130, 140, 150].map((step) => ({ series: 'train_bound', step, value: 2.9 })));
    const done = await r2.finish(run.id, { status: 'finished', stepsDone: 200, summary: { lastBoundBitsPerChar: 2.8, lastIsBound: true } });
    expect(done.body).toEqual({ ok: true });
    const steps = await metricSteps(t, run.id);
    expect(steps).toEqual([100, 110, 120, 130, 140, 150]);
    const after = await request(t.app).get(`${benchUrl()}/runs/${run.id}`).set(bearer(f.tokens.viewer));
    expect(after.body).toMatchObject({ status: 'finished', stepsDone: 200, runner: null, summary: { lastBoundBitsPerChar: 2.8 } });
    // The runner no longer holds it.
    expect((await r2.progress(run.id, progressAt(200))).body.error.code).toBe('RUN_NOT_HELD');
    const overview = await request(t.app).get('/api/runners').set(bearer(f.tokens.admin));
    const embedded = (overview.body as RunnersOverview).runners.find((r) => r.kind === 'embedded')!;
    expect(embedded).toMatchObject({ jobsDone: 1, currentJobs: [] });
  });

  it('refuses to revoke the embedded runner (it has no token to manage)', async () => {
    const overview = await request(t.app).get('/api/runners').set(bearer(f.tokens.admin));
    const embedded = (overview.body as RunnersOverview).runners.find((r) => r.kind === 'embedded')!;
    const res = await request(t.app).delete(`/api/runners/${embedded.id}`).set(bearer(f.tokens.admin));
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/RUNNER_THREADS=0/);
  });
});
