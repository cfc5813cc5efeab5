import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RunDto } from '../../shared/api/runs';
import { createRunnerToken, runnerCall } from '../modules/runners/runners-test-helpers';
import { bearer, createTestApp, type TestApp } from '../testing/test-app';
import { NEW_RUN_TRAINING_DEFAULTS as T } from '../../shared/model/settings-rules';
import { DEMO_BENCH_NAME, seedDemoIfEmpty } from './demo-seed';
import { DEMO_RUNS, DEMO_RUN_CORPUS } from './demo-runs';

let t: TestApp;
let token: string;
let benchId: string;
beforeAll(async () => {
  t = await createTestApp();
  expect(await seedDemoIfEmpty(t.orm, t.config, t.clock)).toBe(true);
  token = (await request(t.app).post('/api/auth/signin').send({ email: t.config.demoEmail, password: t.config.demoPassword })).body.token as string;
  const benches = await request(t.app).get('/api/benches').set(bearer(token));
  benchId = (benches.body as { id: string; name: string }[]).find((b) => b.name === DEMO_BENCH_NAME)!.id;
});
afterAll(async () => t.close());

describe('demo runs', () => {
  it('puts a baseline, a GRU and a state-space model on the demo corpus, waiting for the runners', async () => {
    const res = await request(t.app).get(`/api/benches/${benchId}/runs`).set(bearer(token));
    expect(res.status).toBe(200);
    const runs = (res.body as { items: RunDto[] }).items;
    expect(runs.map((r) => r.name).sort()).toEqual(DEMO_RUNS.map((r) => r.name).sort());
    expect(new Set(runs.map((r) => r.family))).toEqual(new Set(['ngram', 'gru', 'ssm']));
    for (const run of runs) {
      expect(run).toMatchObject({ status: 'queued', placement: 'runners', corpus: { name: DEMO_RUN_CORPUS }, stepsDone: 0 });
      expect(run.alphabet.length).toBeGreaterThan(10);
    }
  });

  it('hands them to a runner in the order listed, quick ones first, with the form\'s defaults', async () => {
    const runner = await createRunnerToken(t, token, 'Demo box');
    const call = runnerCall(t, runner.token);
    const claimed: string[] = [];
    for (let i = 0; i < DEMO_RUNS.length; i++) {
      const res = await call.claim();
      expect(res.status).toBe(200);
      claimed.push(res.body.runName as string);
      if (res.body.family === 'ssm') expect(res.body.settings.training).toMatchObject({ observationInitScale: T.observationInitScale, clipNorm: T.clipNorm });
    }
    expect(claimed).toEqual(DEMO_RUNS.map((r) => r.name));
    expect((await call.claim()).status).toBe(204);
  });
});
