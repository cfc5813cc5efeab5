/**
 * Claims that wait for work (`POST /api/runner/claim` with `waitSeconds`) on the embedded back-end, through the REST
 * API: a claim made before any run exists answers with the run sent to runners afterwards; a short wait with no
 * work answers 204; a waiting claim ends (204) when an evaluation request starts waiting, so the runner can claim
 * that (and the Runners overview counts the request as waiting until then); a client that goes away stops waiting;
 * the field is validated. Timeouts are generous bounds only.
 */
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RunnerEvaluationJob } from '../../../shared/api/evaluation-jobs';
import type { RunnerJob } from '../../../shared/api/runner-jobs';
import type { RunnersOverview } from '../../../shared/api/runners';
import type { CheckpointDto } from '../../../shared/api/runs';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { createRun, ssmCheckpointBytes, ssmRunBody, uploadCorpus } from '../runs/runs-test-helpers';
import { createRunnerRun, createRunnerToken } from './runners-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpus: { id: string; alphabet: string[] };
let token = '';

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  token = (await createRunnerToken(t, f.tokens.admin, 'Porch box')).token;
});
afterAll(async () => t.close());

const claim = (body: object) => request(t.app).post('/api/runner/claim').set(bearer(token)).send(body);

const overviewQueue = async () => ((await request(t.app).get('/api/runners').set(bearer(f.tokens.admin))).body as RunnersOverview).queue;

/** Resolves once `n` claims wait on the server (polls the app's wake-up signal). */
async function claimsWaiting(n: number): Promise<void> {
  while (t.ctx.runnerWakeup.waiting !== n) await new Promise((r) => setTimeout(r, 20));
}

describe('a claim that waits for work', () => {
  it('refuses waitSeconds that is not a whole number of 0 to 25 seconds, naming the field', async () => {
    for (const waitSeconds of [26, -1, 2.5, '5']) {
      const res = await claim({ waitSeconds });
      expect(res.status).toBe(422);
      expect(res.body.error.code).toBe('VALIDATION_FAILED');
      expect(res.body.error.message).toMatch(/waitSeconds/);
      expect(res.body.error.fields.waitSeconds).toMatch(/waitSeconds/);
    }
    expect((await claim({ waitSeconds: 26 })).body.error.fields.waitSeconds).toMatch(/at most 25/);
  });

  it('refuses waitSeconds together with a run id', async () => {
    const run = await createRunnerRun(t, f.benchId, f.tokens.member, corpus.id, 'Named claim');
    const res = await claim({ runId: run.id, waitSeconds: 5 });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.waitSeconds).toMatch(/only without a runId/);
    // Nothing was claimed: the run is still there for a claim.
    const taken = await claim({ runId: run.id });
    expect(taken.status).toBe(200);
    expect((taken.body as RunnerJob).runId).toBe(run.id);
  });

  it('answers 204 when its wait ends with nothing to do', async () => {
    const res = await claim({ waitSeconds: 1 });
    expect(res.status).toBe(204);
    expect(t.ctx.runnerWakeup.waiting).toBe(0);
  }, 15_000);

  it('answers with the run sent to runners after the claim began to wait', async () => {
    const pending = claim({ waitSeconds: 20 }).then((r) => r);
    await claimsWaiting(1);
    const run = await createRunnerRun(t, f.benchId, f.tokens.member, corpus.id, 'Arrives later');
    const res = await pending;
    expect(res.status).toBe(200);
    expect(res.body as RunnerJob).toMatchObject({ runId: run.id, benchId: f.benchId, stepsDone: 0 });
    const seen = await request(t.app).get(`/api/benches/${f.benchId}/runs/${run.id}`).set(bearer(f.tokens.viewer));
    expect(seen.body).toMatchObject({ status: 'training', runner: { name: 'Porch box' } });
  }, 15_000);

  it('ends (204) when an evaluation request starts waiting, and the runner can then claim the evaluation', async () => {
    const tabRun = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Evaluate me'));
    const up = await request(t.app).post(`/api/benches/${f.benchId}/runs/${tabRun.id}/checkpoints?reason=manual`).set(bearer(f.tokens.member))
      .set('Content-Type', 'application/octet-stream').send(Buffer.from(ssmCheckpointBytes(corpus.alphabet, { step: 60 })));
    const checkpoint = up.body as CheckpointDto;
    const pending = claim({ waitSeconds: 20 }).then((r) => r);
    await claimsWaiting(1);
    const asked = await request(t.app).post(`/api/benches/${f.benchId}/runs/${tabRun.id}/checkpoints/${checkpoint.id}/evaluation-requests`)
      .set(bearer(f.tokens.member)).send({ settings: { K: 8, seed: 3 } });
    expect(asked.status).toBe(201);
    const res = await pending;
    expect(res.status).toBe(204);
    // The Runners page counts the request among the work waiting for a runner until one claims it.
    expect((await overviewQueue()).evaluationsWaiting).toBe(1);
    const evaluation = await request(t.app).post('/api/runner/evaluations/claim').set(bearer(token)).send({});
    expect(evaluation.status).toBe(200);
    expect(evaluation.body as RunnerEvaluationJob).toMatchObject({ requestId: asked.body.id, runId: tabRun.id, checkpoint: { step: 60 } });
    expect(await overviewQueue()).toEqual({ waiting: 0, active: 2, evaluationsWaiting: 0 });
  }, 15_000);

  it('stops waiting when the client goes away', async () => {
    const server: Server = createServer(t.app);
    await new Promise<void>((ok) => server.listen(0, '127.0.0.1', ok));
    try {
      const { port } = server.address() as AddressInfo;
      const gone = new AbortController();
      const pending = fetch(`http://127.0.0.1:${port}/api/runner/claim`, {
        method: 'POST', headers: { ...bearer(token), 'Content-Type': 'application/json' }, body: JSON.stringify({ waitSeconds: 20 }), signal: gone.signal,
      }).catch((e: unknown) => e);
      await claimsWaiting(1);
      gone.abort();
      expect(await pending).toBeInstanceOf(Error);
      await claimsWaiting(0);
      // A run queued now is not taken by the claim that went away: it waits for the next claim.
      const run = await createRunnerRun(t, f.benchId, f.tokens.member, corpus.id, 'After the hang-up');
      const next = await claim({});
      expect(next.status).toBe(200);
      expect((next.body as RunnerJob).runId).toBe(run.id);
    } finally {
      await new Promise<void>((ok) => {
        server.close(() => ok());
        server.closeAllConnections();
      });
    }
  }, 15_000);

  it('answers 204 at once when the server shuts its wake-up signal (shutdown)', async () => {
    const pending = claim({ waitSeconds: 20 }).then((r) => r);
    await claimsWaiting(1);
    t.ctx.runnerWakeup.close();
    expect((await pending).status).toBe(204);
    // A claim after the shutdown began does not wait either.
    expect((await claim({ waitSeconds: 20 })).status).toBe(204);
  }, 15_000);
});
