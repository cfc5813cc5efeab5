/**
 * Fair claims (the bench with the fewest runs held by runners first, then the oldest run), and pause / stop /
 * resume of runner runs: the runner learns a control within one progress call or heartbeat.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RunnerJob } from '../../../shared/api/runner-jobs';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { ssmCheckpointBytes, uploadCorpus } from '../runs/runs-test-helpers';
import { createRunnerRun, createRunnerToken, metricSteps, progressAt, runnerCall } from './runners-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpus: { id: string; alphabet: string[] };
let token: string;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  token = (await createRunnerToken(t, f.tokens.admin)).token;
});
afterAll(async () => t.close());

const control = (runId: string, action: string, who: keyof BenchFixture['tokens'] = 'member') =>
  request(t.app).post(`/api/benches/${f.benchId}/runs/${runId}/control`).set(bearer(f.tokens[who])).send({ action });

describe('fair claims', () => {
  it("serves a bench's single run before the rest of another bench's grid", async () => {
    // Bench 1 sends a 3-cell grid first; bench 2 sends one run afterwards.
    const grid = await request(t.app).post(`/api/benches/${f.benchId}/grids`).set(bearer(f.tokens.member)).send({
      name: 'Sizes', corpusId: corpus.id, family: 'gru', placement: 'runners',
      baseSettings: { model: { embeddingSize: 2, observationHidden: 0 }, training: { steps: 10, batchSize: 4, learningRate: 0.01 } },
      axes: [{ key: 'model.stateSize', values: [2, 3, 4] }],
    });
    expect(grid.status).toBe(201);
    expect(grid.body.placement).toBe('runners');
    t.clock.advance(1000);
    const bench2 = await request(t.app).post('/api/benches').set(bearer(f.tokens.coach)).send({ name: 'Second bench' });
    const corpus2 = await uploadCorpus(t, bench2.body.id, f.tokens.coach);
    const single = await createRunnerRun(t, bench2.body.id, f.tokens.coach, corpus2.id, 'Lonely run');

    const runner = runnerCall(t, token);
    const order: string[] = [];
    for (let i = 0; i < 4; i++) order.push(((await runner.claim()).body as RunnerJob).runName);
    // The grid's cells share one creation time, so which cell comes first is open; the single run must come second.
    expect(order[1]).toBe(single.name);
    expect(order[0]!.startsWith('Sizes')).toBe(true);
    expect(order[2]!.startsWith('Sizes')).toBe(true);
    expect(order[3]!.startsWith('Sizes')).toBe(true);
    expect(new Set(order).size).toBe(4);
    expect((await runner.claim()).status).toBe(204);
    // Give them all back so the next tests start from an empty queue.
    const held = await request(t.app).get('/api/runners').set(bearer(f.tokens.admin));
    for (const job of held.body.runners[0].currentJobs) await runner.finish(job.runId, { status: 'stopped', stepsDone: 0 });
  });
});

describe('control of a runner run', () => {
  it('pauses through the progress answer, resumes from the checkpoint, and stops through a heartbeat', async () => {
    const run = await createRunnerRun(t, f.benchId, f.tokens.member, corpus.id, 'Steered');
    const runner = runnerCall(t, token);
    expect(((await runner.claim()).body as RunnerJob).runId).toBe(run.id);
    await runner.progress(run.id, progressAt(60));
    await runner.metrics(run.id, [40, 50, 60, 70].map((step) => ({ series: 'train_bound', step, value: 3 })));

    // A tab's PATCH to pause a run a runner holds is passed to the runner as a control, not applied at once.
    const patched = await request(t.app).patch(`/api/benches/${f.benchId}/runs/${run.id}`).set(bearer(f.tokens.member)).send({ status: 'paused' });
    expect(patched.status).toBe(200);
    expect(patched.body).toMatchObject({ status: 'training', runner: { name: 'Cellar box' } });
    expect(patched.body.message).toMatch(/saves a checkpoint and pauses/);
    // A viewer may not; the creator may.
    expect((await control(run.id, 'pause', 'viewer')).status).toBe(403);
    const asked = await control(run.id, 'pause');
    expect(asked.status).toBe(200);
    expect(asked.body).toMatchObject({ status: 'training' });
    expect(asked.body.message).toMatch(/saves a checkpoint and pauses/);
    expect((await runner.progress(run.id, progressAt(70))).body).toEqual({ action: 'pause' });
    expect((await runner.uploadCheckpoint(run.id, ssmCheckpointBytes(corpus.alphabet, { step: 60 }), 'stop')).status).toBe(201);
    expect((await runner.finish(run.id, { status: 'paused', stepsDone: 70 })).status).toBe(200);
    const paused = await request(t.app).get(`/api/benches/${f.benchId}/runs/${run.id}`).set(bearer(f.tokens.viewer));
    expect(paused.body).toMatchObject({ status: 'paused', runner: null, stepsDone: 70 });

    const resumed = await control(run.id, 'resume');
    expect(resumed.body).toMatchObject({ status: 'queued' });
    const job = (await runner.claim()).body as RunnerJob;
    expect(job).toMatchObject({ runId: run.id, stepsDone: 60, checkpoint: { step: 60 } });
    expect(await metricSteps(t, run.id)).toEqual([40, 50, 60]);

    expect((await control(run.id, 'stop', 'coach')).body.message).toMatch(/stops the run/);
    expect((await runner.heartbeat({ threads: 1, jobs: [{ runId: run.id, step: 65, stepsPerSecond: 3 }] })).body).toEqual({ controls: [{ runId: run.id, action: 'stop' }] });
    await runner.finish(run.id, { status: 'stopped', stepsDone: 65 });
    const stopped = await request(t.app).get(`/api/benches/${f.benchId}/runs/${run.id}`).set(bearer(f.tokens.viewer));
    expect(stopped.body).toMatchObject({ status: 'stopped', stepsDone: 65 });

    // A late pause (from a tab or a runner) on an ended run changes nothing.
    const late = await control(run.id, 'pause');
    expect(late.status).toBe(200);
    expect(late.body).toMatchObject({ status: 'stopped', stepsDone: 65 });
    expect(late.body.message).toMatch(/changed nothing/);
  });

  it('stops a waiting run at once and keeps it off the queue', async () => {
    const run = await createRunnerRun(t, f.benchId, f.tokens.member, corpus.id, 'Never started');
    const stopped = await control(run.id, 'stop');
    expect(stopped.body).toMatchObject({ status: 'stopped', runner: null });
    expect((await runnerCall(t, token).claim()).status).toBe(204);
    const refused = await control(run.id, 'nap');
    expect(refused.status).toBe(422);
    expect(refused.body.error.fields.action).toMatch(/pause, resume or stop/);
  });
});

describe('learnability checks on runners', () => {
  it('queues all eleven runs for runners when sent there', async () => {
    const res = await request(t.app).post(`/api/benches/${f.benchId}/corpora/${corpus.id}/learnability`).set(bearer(f.tokens.member)).send({ budgetSteps: 20, placement: 'runners' });
    expect(res.status).toBe(201);
    expect(res.body.placement).toBe('runners');
    const rows: { placement: string; status: string }[] = await t.orm.em.fork().getConnection()
      .execute('select placement, status from runs where grid_id = ?', [res.body.id]);
    expect(rows).toHaveLength(11);
    expect(rows.every((r) => r.placement === 'runners' && r.status === 'queued')).toBe(true);
    const status = await request(t.app).get(`/api/benches/${f.benchId}/runner-status`).set(bearer(f.tokens.viewer));
    expect(status.body.waiting).toBe(11);
  });
});
