/**
 * A runner that stops answering: its run shows that it waits for a runner as soon as the lease runs out (not
 * `training` until someone claims it), the change reaches the bench's event stream, the silent runner may no
 * longer write to the run, and another runner resumes it. A lease renewed by a heartbeat does not run out.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RUNNER_LEASE_SECONDS, type RunnerJob } from '../../../shared/api/runner-jobs';
import type { RunDto } from '../../../shared/api/runs';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { uploadCorpus } from '../runs/runs-test-helpers';
import { expireLeases } from './lease-expiry';
import type { RunEvent } from './run-events';
import { createRunnerRun, createRunnerToken, progressAt, runnerCall } from './runners-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpus: { id: string; alphabet: string[] };

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
});
afterAll(async () => {
  await t.close();
});

const getRun = async (id: string) => (await request(t.app).get(`/api/benches/${f.benchId}/runs/${id}`).set(bearer(f.tokens.viewer))).body as RunDto;

describe('an expired runner lease', () => {
  it('puts the run back to waiting for a runner as soon as the lease runs out, and not before', async () => {
    const silent = runnerCall(t, (await createRunnerToken(t, f.tokens.admin, 'Silent box')).token);
    const run = await createRunnerRun(t, f.benchId, f.tokens.member, corpus.id, 'Left behind');
    expect(((await silent.claim()).body as RunnerJob).runId).toBe(run.id);
    expect((await silent.progress(run.id, progressAt(40))).status).toBe(200);
    const events: RunEvent[] = [];
    const unsubscribe = t.runEvents.subscribe(f.benchId, (e) => events.push(e));
    try {
      // A heartbeat that names the job renews the lease: 40 s, heartbeat, 40 s more is still within the lease.
      t.clock.advance(40_000);
      expect((await silent.heartbeat({ threads: 1, jobs: [{ runId: run.id, step: 60, stepsPerSecond: 2 }] })).status).toBe(200);
      t.clock.advance(40_000);
      expect(await expireLeases(t.ctx)).toBe(0);
      expect(await getRun(run.id)).toMatchObject({ status: 'training', runner: { name: 'Silent box' } });

      // Then silence: one second past the lease, the run waits for a runner again.
      t.clock.advance((RUNNER_LEASE_SECONDS - 40 + 1) * 1000);
      expect(await expireLeases(t.ctx)).toBe(1);
      const waiting = await getRun(run.id);
      expect(waiting).toMatchObject({ status: 'queued', runner: null, stepsDone: 40 });
      expect(waiting.statusReason).toMatch(/"Silent box" stopped answering.*waiting for a runner/);
      const published = events.filter((e): e is Extract<RunEvent, { name: 'run' }> => e.name === 'run' && e.runId === run.id);
      expect(published.at(-1)?.data).toMatchObject({ status: 'queued', runner: null });
      expect(await expireLeases(t.ctx)).toBe(0);
    } finally {
      unsubscribe();
    }

    // The silent runner comes back: it no longer holds the run. Another runner takes it.
    expect((await silent.progress(run.id, progressAt(80))).body.error.code).toBe('RUN_NOT_HELD');
    const other = runnerCall(t, (await createRunnerToken(t, f.tokens.admin, 'Second box')).token);
    expect(((await other.claim()).body as RunnerJob).runId).toBe(run.id);
    expect(await getRun(run.id)).toMatchObject({ status: 'training', statusReason: null, runner: { name: 'Second box' } });
  });
});
