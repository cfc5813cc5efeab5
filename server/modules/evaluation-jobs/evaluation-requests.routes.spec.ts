/**
 * Evaluations sent to runners on the embedded back-end, through the REST API: a request waits as a row, a
 * runner claims it under a lease, reads the checkpoint and the corpus, reports its stage and posts figures
 * that are stored exactly as a tab's (same checks); refusals for a wrong token, another runner's request and
 * bad figures (422, nothing stored); a runner that stops answering loses the request to the next one.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { EvaluationRequestDto, RunnerEvaluationJob } from '../../../shared/api/evaluation-jobs';
import type { EvaluationDto } from '../../../shared/api/evaluations';
import type { RunnersOverview } from '../../../shared/api/runners';
import type { CheckpointDto, RunDto, TrainingSet } from '../../../shared/api/runs';
import { decodeCheckpoint } from '../../../shared/model/checkpoint';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { ssmResultsFixture } from '../evaluations/evaluation-test-fixture';
import { expireLeases } from '../runners/lease-expiry';
import { prepareEmbeddedRunner } from '../runners/runner-startup';
import { createRunnerToken } from '../runners/runners-test-helpers';
import { createRun, ssmCheckpointBytes, ssmRunBody, uploadCorpus } from '../runs/runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let run: RunDto;
let checkpoint: CheckpointDto;
let tokenA: string;
let tokenB: string;

const api = () => request(t.app);
const requestsUrl = () => `/api/benches/${f.benchId}/runs/${run.id}/checkpoints/${checkpoint.id}/evaluation-requests`;
const runnerApi = (token: string) => ({
  claim: (requestId?: string) => api().post('/api/runner/evaluations/claim').set(bearer(token)).send(requestId ? { requestId } : {}),
  checkpoint: (id: string) => api().get(`/api/runner/evaluations/${id}/checkpoint`).set(bearer(token)).buffer(true)
    .parse((res, done) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => done(null, Buffer.concat(chunks)));
    }),
  trainingSet: (id: string) => api().get(`/api/runner/evaluations/${id}/training-set`).set(bearer(token)),
  progress: (id: string, body: object) => api().post(`/api/runner/evaluations/${id}/progress`).set(bearer(token)).send(body),
  result: (id: string, body: object) => api().post(`/api/runner/evaluations/${id}/result`).set(bearer(token)).send(body),
  end: (id: string, body: object) => api().post(`/api/runner/evaluations/${id}/end`).set(bearer(token)).send(body),
});
const readRequest = async (id: string) =>
  (await api().get(`/api/benches/${f.benchId}/evaluation-requests/${id}`).set(bearer(f.tokens.viewer))).body as EvaluationRequestDto;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  const corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Member SSM'));
  const up = await api().post(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints?reason=manual`).set(bearer(f.tokens.member))
    .set('Content-Type', 'application/octet-stream').send(Buffer.from(ssmCheckpointBytes(corpus.alphabet, { step: 120 })));
  checkpoint = up.body as CheckpointDto;
  tokenA = (await createRunnerToken(t, f.tokens.admin, 'Attic box')).token;
  tokenB = (await createRunnerToken(t, f.tokens.admin, 'Shed box')).token;
});
afterAll(async () => t.close());

describe('evaluation requests on the embedded back-end', () => {
  let asked: EvaluationRequestDto;

  it('keeps a request waiting as a row; a viewer may not ask, a second ask returns the same request', async () => {
    const viewer = await api().post(requestsUrl()).set(bearer(f.tokens.viewer)).send({ settings: { K: 64, seed: 5 } });
    expect(viewer.status).toBe(403);
    const bad = await api().post(requestsUrl()).set(bearer(f.tokens.member)).send({ settings: { K: 0 } });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fields['settings.K']).toMatch(/at least 1/);
    expect(await countRows(t, 'evaluation_requests')).toBe(0);

    const res = await api().post(requestsUrl()).set(bearer(f.tokens.member)).send({ settings: { K: 64, seed: 5 } });
    expect(res.status).toBe(201);
    asked = res.body as EvaluationRequestDto;
    expect(asked).toMatchObject({ status: 'waiting', runId: run.id, checkpoint: { id: checkpoint.id, step: 120 }, runnerName: null, evaluationId: null });
    expect(asked.settings).toMatchObject({ K: 64, seed: 5, repeats: 3, heldOutSplit: 'test', ngramOrder: 3 });
    const again = await api().post(requestsUrl()).set(bearer(f.tokens.member)).send({ settings: { K: 64, seed: 5 } });
    expect(again.status).toBe(200);
    expect(again.body.id).toBe(asked.id);
    const list = await api().get(requestsUrl()).set(bearer(f.tokens.viewer));
    expect(list.body.map((r: EvaluationRequestDto) => r.id)).toEqual([asked.id]);
  });

  it('refuses person tokens and runners that do not hold the request', async () => {
    const person = await api().post('/api/runner/evaluations/claim').set(bearer(f.tokens.admin)).send({});
    expect(person.status).toBe(401);
    const early = await runnerApi(tokenA).trainingSet(asked.id);
    expect(early.status).toBe(409);
    expect(early.body.error.code).toBe(ErrorCode.RunNotHeld);
  });

  it('gives the request to one runner, which reads the checkpoint and corpus and reports its stage', async () => {
    const claim = await runnerApi(tokenA).claim();
    expect(claim.status).toBe(200);
    const job = claim.body as RunnerEvaluationJob;
    expect(job).toMatchObject({ requestId: asked.id, runId: run.id, family: 'ssm', checkpoint: { id: checkpoint.id, step: 120 }, leaseSeconds: 45 });
    expect(job.settings).toEqual(asked.settings);
    expect((await runnerApi(tokenB).claim()).status).toBe(204);
    const held = await runnerApi(tokenB).claim(asked.id);
    expect(held.status).toBe(409);
    expect(held.body.error.code).toBe(ErrorCode.RunHeld);
    expect(held.body.error.retryAfterSeconds).toBe(45);

    const bytes = await runnerApi(tokenA).checkpoint(asked.id);
    expect(bytes.status).toBe(200);
    expect(decodeCheckpoint(new Uint8Array(bytes.body as Buffer)).step).toBe(120);
    const set = (await runnerApi(tokenA).trainingSet(asked.id)).body as TrainingSet;
    const tabSet = (await api().get(`/api/benches/${f.benchId}/corpora/${run.corpus!.id}/training-set`).set(bearer(f.tokens.viewer))).body as TrainingSet;
    expect(set).toEqual(tabSet);
    expect((await runnerApi(tokenB).checkpoint(asked.id)).status).toBe(409);
    expect((await runnerApi(tokenB).progress(asked.id, { done: 1, total: 9, next: 'x' })).body.error.code).toBe(ErrorCode.RunNotHeld);

    expect((await runnerApi(tokenA).progress(asked.id, { done: 2, total: 9, next: 'noise draws' })).status).toBe(200);
    expect(await readRequest(asked.id)).toMatchObject({ status: 'running', runnerName: 'Attic box', stage: { done: 2, total: 9, next: 'noise draws' } });
    // The Runners page lists it as the runner's current job; the other runner is idle.
    const overview = (await api().get('/api/runners').set(bearer(f.tokens.admin))).body as RunnersOverview;
    const byName = (name: string) => overview.runners.find((r) => r.name === name)!;
    expect(byName('Attic box').currentEvaluations).toEqual([{
      requestId: asked.id, runId: run.id, runName: 'Member SSM', benchId: f.benchId, benchName: expect.any(String), checkpointStep: 120,
      stage: { done: 2, total: 9, next: 'noise draws' },
    }]);
    expect(byName('Shed box').currentEvaluations).toEqual([]);
  });

  it('refuses bad figures with a 422 and stores nothing; stores good ones as a tab would', async () => {
    const nan = ssmResultsFixture() as { tight: { bitsPerChar: number | null } };
    nan.tight.bitsPerChar = null;
    const bad = await runnerApi(tokenA).result(asked.id, { results: nan });
    expect(bad.status).toBe(422);
    const wrongFamily = await runnerApi(tokenA).result(asked.id, { results: { ...ssmResultsFixture(), family: 'gru' } });
    expect(wrongFamily.status).toBe(422);
    const someoneElse = await runnerApi(tokenB).result(asked.id, { results: ssmResultsFixture() });
    expect(someoneElse.status).toBe(409);
    expect(await countRows(t, 'evaluations')).toBe(0);
    expect((await readRequest(asked.id)).status).toBe('running');

    const ok = await runnerApi(tokenA).result(asked.id, { results: ssmResultsFixture() });
    expect(ok.status).toBe(201);
    const done = await readRequest(asked.id);
    expect(done).toMatchObject({ status: 'finished', evaluationId: ok.body.evaluationId, runnerName: null });
    const stored = (await api().get(`/api/benches/${f.benchId}/evaluations/${ok.body.evaluationId}`).set(bearer(f.tokens.viewer))).body as EvaluationDto;
    expect(stored.results).toEqual(ssmResultsFixture());
    expect(stored.settings).toEqual(asked.settings);
    expect(stored.createdBy?.id).toBe(asked.createdBy?.id);
    // Figures already stored for these settings: asking again answers with them.
    const exists = await api().post(requestsUrl()).set(bearer(f.tokens.member)).send({ settings: { K: 64, seed: 5 } });
    expect(exists.status).toBe(409);
    expect(exists.body.error.existing.id).toBe(stored.id);
    expect((await runnerApi(tokenA).result(asked.id, { results: ssmResultsFixture() })).status).toBe(409);
  });

  it('gives a request whose runner stopped answering to the next runner, and records a failure with its reason', async () => {
    const second = (await api().post(requestsUrl()).set(bearer(f.tokens.member)).send({ settings: { K: 32, seed: 6 } })).body as EvaluationRequestDto;
    expect((await runnerApi(tokenA).claim()).body.requestId).toBe(second.id);
    t.clock.advance(46_000);
    expect(await expireLeases(t.ctx)).toBeGreaterThanOrEqual(1);
    const waiting = await readRequest(second.id);
    expect(waiting).toMatchObject({ status: 'waiting', runnerName: null });
    expect(waiting.statusReason).toMatch(/stopped answering/);
    expect((await runnerApi(tokenB).claim(second.id)).body.requestId).toBe(second.id);
    // The runner that came back late may no longer touch it.
    expect((await runnerApi(tokenA).progress(second.id, { done: 1, total: 2, next: 'x' })).status).toBe(409);

    const noReason = await runnerApi(tokenB).end(second.id, { status: 'failed' });
    expect(noReason.status).toBe(422);
    expect(noReason.body.error.fields.reason).toMatch(/Say why/);
    expect((await runnerApi(tokenB).end(second.id, { status: 'failed', reason: 'The test split of this corpus is empty.' })).status).toBe(200);
    expect(await readRequest(second.id)).toMatchObject({ status: 'failed', statusReason: 'The test split of this corpus is empty.' });
    expect((await runnerApi(tokenB).claim()).status).toBe(204);
  });

  it('keeps a request across a server restart: the one the embedded threads held waits again for the next runner', async () => {
    const third = (await api().post(requestsUrl()).set(bearer(f.tokens.member)).send({ settings: { K: 16, seed: 7 } })).body as EvaluationRequestDto;
    const first = await prepareEmbeddedRunner(t.orm, t.clock);
    expect((await runnerApi(first.token).claim()).body.requestId).toBe(third.id);
    expect((await readRequest(third.id)).status).toBe('running');
    // What the server does at its next start: a new token for its threads, their work back to the queue.
    const second = await prepareEmbeddedRunner(t.orm, t.clock);
    expect(await readRequest(third.id)).toMatchObject({ status: 'waiting', runnerName: null });
    expect((await runnerApi(first.token).claim()).status).toBe(401);
    expect((await runnerApi(second.token).claim()).body.requestId).toBe(third.id);
  });

  it('withdraws a request that waits or failed; refuses one a runner computes or that is done', async () => {
    const byId = (id: string) => api().delete(`/api/benches/${f.benchId}/evaluation-requests/${id}`);
    const all = (await api().get(requestsUrl()).set(bearer(f.tokens.viewer))).body as EvaluationRequestDto[];
    const running = all.find((r) => r.status === 'running')!;
    const failed = all.find((r) => r.status === 'failed')!;
    const finished = all.find((r) => r.status === 'finished')!;
    const waiting = (await api().post(requestsUrl()).set(bearer(f.tokens.member)).send({ settings: { K: 8, seed: 8 } })).body as EvaluationRequestDto;
    const rows = await countRows(t, 'evaluation_requests');

    expect((await byId(waiting.id).set(bearer(f.tokens.viewer))).status).toBe(403);
    const busy = await byId(running.id).set(bearer(f.tokens.member));
    expect(busy.status).toBe(409);
    expect(busy.body.error.message).toMatch(/is computing this evaluation already/);
    const done = await byId(finished.id).set(bearer(f.tokens.member));
    expect(done.status).toBe(409);
    expect(done.body.error.message).toMatch(/delete the stored evaluation instead/);
    expect(await countRows(t, 'evaluation_requests')).toBe(rows);

    expect((await byId(waiting.id).set(bearer(f.tokens.member))).status).toBe(204);
    expect((await byId(failed.id).set(bearer(f.tokens.member))).status).toBe(204);
    expect(await countRows(t, 'evaluation_requests')).toBe(rows - 2);
    expect((await api().get(`/api/benches/${f.benchId}/evaluation-requests/${waiting.id}`).set(bearer(f.tokens.viewer))).status).toBe(404);
    expect((await byId(waiting.id).set(bearer(f.tokens.member))).status).toBe(404);
    // No runner gets the withdrawn request.
    expect((await runnerApi(tokenB).claim()).status).toBe(204);
  });
});
