/**
 * What a runner token may touch: only /api/runner/*, only the runs it holds (and their corpus), nothing
 * after revocation. Refused calls write nothing.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { RunnerJob } from '../../../shared/api/runner-jobs';
import type { TrainingSet } from '../../../shared/api/runs';
import { splitOf } from '../../../shared/data/split';
import { bearer, countAllRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { createRun, ssmCheckpointBytes, tinySsmModel, tinyTraining, uploadCorpus } from '../runs/runs-test-helpers';
import { createRunnerRun, createRunnerToken, progressAt, runnerCall } from './runners-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpus: { id: string; alphabet: string[] };
let otherBench: { id: string; corpusId: string; runId: string };
let tokenA: string;
let tokenB: string;
let heldByA: RunnerJob;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  tokenA = (await createRunnerToken(t, f.tokens.admin, 'Runner A')).token;
  tokenB = (await createRunnerToken(t, f.tokens.admin, 'Runner B')).token;
  await createRunnerRun(t, f.benchId, f.tokens.member, corpus.id, 'Held by A');
  heldByA = (await runnerCall(t, tokenA).claim()).body as RunnerJob;
  // A second bench with its own corpus and a tab run that no runner may touch.
  const bench = await request(t.app).post('/api/benches').set(bearer(f.tokens.outsider)).send({ name: 'Other bench' });
  const other = await uploadCorpus(t, bench.body.id, f.tokens.outsider, 'word\tcount\nzz\t3\nzy\t1\n', 'Private words');
  const run = await request(t.app).post(`/api/benches/${bench.body.id}/runs`).set(bearer(f.tokens.outsider))
    .send({ family: 'ngram', name: 'Private', corpusId: other.id, settings: { model: { order: 2 } } });
  otherBench = { id: bench.body.id, corpusId: other.id, runId: run.body.id };
});
afterAll(async () => t.close());

describe('runner tokens', () => {
  it('work only on the runner routes, and person tokens do not work there', async () => {
    expect(heldByA.runName).toBe('Held by A');
    for (const path of ['/api/benches', `/api/benches/${f.benchId}/runs`, `/api/benches/${otherBench.id}/corpora/${otherBench.corpusId}/training-set`, '/api/runners']) {
      const res = await request(t.app).get(path).set(bearer(tokenA));
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe(ErrorCode.NotSignedIn);
    }
    const person = await request(t.app).post('/api/runner/heartbeat').set(bearer(f.tokens.admin)).send({ threads: 1, jobs: [] });
    expect(person.status).toBe(401);
    expect(person.body.error.message).toMatch(/runner token/);
    const forged = await request(t.app).post('/api/runner/heartbeat').set(bearer(`nwr_${'A'.repeat(43)}`)).send({ threads: 1, jobs: [] });
    expect(forged.status).toBe(401);
  });

  it("cannot read another bench's corpus or a run it does not hold", async () => {
    const a = runnerCall(t, tokenA);
    const other = await a.trainingSet(otherBench.runId);
    expect(other.status).toBe(409);
    expect(other.body.error.code).toBe(ErrorCode.RunNotHeld);
    expect(JSON.stringify(other.body)).not.toContain('zz');
    expect((await a.claim(otherBench.runId)).body.error.code).toBe(ErrorCode.RunNotQueued);
    const b = runnerCall(t, tokenB);
    expect((await b.trainingSet(heldByA.runId)).body.error.code).toBe(ErrorCode.RunNotHeld);
    expect((await b.checkpoint(heldByA.runId)).status).toBe(409);
    expect((await a.trainingSet('00000000-0000-4000-8000-000000000000')).status).toBe(404);
  });

  it('cannot write to a run it does not hold, and the refusals write nothing', async () => {
    const before = await countAllRows(t);
    const b = runnerCall(t, tokenB);
    const calls = [
      await b.progress(heldByA.runId, progressAt(10)),
      await b.metrics(heldByA.runId, [{ series: 'train_bound', step: 10, value: 3 }]),
      await b.uploadCheckpoint(heldByA.runId, ssmCheckpointBytes(corpus.alphabet, { step: 10 })),
      await b.finish(heldByA.runId, { status: 'finished', stepsDone: 10 }),
    ];
    for (const res of calls) {
      expect(res.status).toBe(409);
      expect(res.body.error.code).toBe(ErrorCode.RunNotHeld);
    }
    const held = await b.claim(heldByA.runId);
    expect(held.status).toBe(409);
    expect(held.body.error.code).toBe(ErrorCode.RunHeld);
    expect(held.body.error.retryAfterSeconds).toBe(45);
    expect(await countAllRows(t)).toEqual(before);
    const run = await request(t.app).get(`/api/benches/${f.benchId}/runs/${heldByA.runId}`).set(bearer(f.tokens.viewer));
    expect(run.body).toMatchObject({ status: 'training', stepsDone: 0, runner: { name: 'Runner A' } });
  });

  it('takes over a run whose lease ran out', async () => {
    t.clock.advance(46_000);
    const b = runnerCall(t, tokenB);
    const job = await b.claim(heldByA.runId);
    expect(job.status).toBe(200);
    expect((await runnerCall(t, tokenA).progress(heldByA.runId, progressAt(20))).body.error.code).toBe(ErrorCode.RunNotHeld);
    expect((await b.progress(heldByA.runId, progressAt(20))).body).toEqual({ action: 'continue' });
  });

  it('is refused after revocation, and the revoked runner’s run goes back to the queue', async () => {
    const list = await request(t.app).get('/api/runners').set(bearer(f.tokens.admin));
    const runnerB = list.body.runners.find((r: { name: string }) => r.name === 'Runner B');
    expect(runnerB.currentJobs.map((j: { runId: string }) => j.runId)).toEqual([heldByA.runId]);
    const revoked = await request(t.app).delete(`/api/runners/${runnerB.id}`).set(bearer(f.tokens.admin));
    expect(revoked.status).toBe(200);
    expect(revoked.body.revokedAt).not.toBeNull();
    const b = runnerCall(t, tokenB);
    for (const res of [await b.heartbeat({ threads: 1, jobs: [] }), await b.progress(heldByA.runId, progressAt(30)), await b.claim()]) {
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe(ErrorCode.RunnerRevoked);
    }
    const run = await request(t.app).get(`/api/benches/${f.benchId}/runs/${heldByA.runId}`).set(bearer(f.tokens.viewer));
    expect(run.body).toMatchObject({ status: 'queued', runner: null });
    expect(((await runnerCall(t, tokenA).claim()).body as RunnerJob).runId).toBe(heldByA.runId);
  });
});

describe('the training set of a runner run', () => {
  it("carries the corpus's words and counts, split by the run's own split when it has one", async () => {
    const shares = { train: 0.5, validation: 0.3, test: 0.2 };
    const run = await createRun(t, f.benchId, f.tokens.member, {
      family: 'ssm', name: 'Own split', corpusId: corpus.id, placement: 'runners',
      settings: { model: { ...tinySsmModel }, training: { ...tinyTraining }, split: { seed: 12345, shares } },
    });
    const r = runnerCall(t, (await createRunnerToken(t, f.tokens.admin, 'Split box')).token);
    expect((await r.claim(run.id)).status).toBe(200);
    const set = (await r.trainingSet(run.id)).body as TrainingSet;
    const stored = (await request(t.app).get(`/api/benches/${f.benchId}/corpora/${corpus.id}/training-set`).set(bearer(f.tokens.viewer))).body as TrainingSet;
    expect(set.words).toEqual(['abba', 'aa', 'baba', 'abc', 'acab', 'cab', 'bac', 'bb', 'cabba', 'cc']);
    expect(stored.words).toEqual(set.words);
    expect(set.counts).toEqual([5, 4, 3, 2, 2, 2, 1, 1, 1, 1]);
    expect(set.splits).toEqual(set.words.map((w) => splitOf(w, 12345, shares)));
    expect(set.splits).not.toEqual(stored.splits);
  });
});
