/** Helpers for the runner specs: runner tokens made through the admin route, runner calls, runs placed on runners. */
import request from 'supertest';
import type { RunDto } from '../../../shared/api/runs';
import type { CreatedRunner } from '../../../shared/api/runners';
import { bearer, type TestApp } from '../../testing/test-app';
import { createRun, ssmRunBody } from '../runs/runs-test-helpers';

export async function createRunnerToken(t: TestApp, adminToken: string, name = 'Cellar box'): Promise<CreatedRunner> {
  const res = await request(t.app).post('/api/runners').set(bearer(adminToken)).send({ name });
  if (res.status !== 201) throw new Error(`runner creation failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as CreatedRunner;
}

export function runnerCall(t: TestApp, token: string) {
  const api = request(t.app);
  return {
    heartbeat: (body: object) => api.post('/api/runner/heartbeat').set(bearer(token)).send(body),
    claim: (runId?: string) => api.post('/api/runner/claim').set(bearer(token)).send(runId ? { runId } : {}),
    trainingSet: (runId: string) => api.get(`/api/runner/jobs/${runId}/training-set`).set(bearer(token)),
    checkpoint: (runId: string) => api.get(`/api/runner/jobs/${runId}/checkpoint`).set(bearer(token)),
    progress: (runId: string, body: object) => api.post(`/api/runner/jobs/${runId}/progress`).set(bearer(token)).send(body),
    metrics: (runId: string, points: { series: string; step: number; value: number }[]) =>
      api.post(`/api/runner/jobs/${runId}/metrics`).set(bearer(token)).send({ points }),
    uploadCheckpoint: (runId: string, bytes: Uint8Array, reason = 'auto') =>
      api.post(`/api/runner/jobs/${runId}/checkpoints?reason=${reason}`).set(bearer(token)).set('Content-Type', 'application/octet-stream').send(Buffer.from(bytes)),
    finish: (runId: string, body: object) => api.post(`/api/runner/jobs/${runId}/finish`).set(bearer(token)).send(body),
  };
}

export async function createRunnerRun(t: TestApp, benchId: string, token: string, corpusId: string, name: string): Promise<RunDto> {
  return createRun(t, benchId, token, { ...ssmRunBody(corpusId, name), placement: 'runners' });
}

export const progressAt = (step: number, steps = 200) => ({ step, steps, stepsPerSecond: 4, bitsPerChar: 3.1, isBound: true });

/** Metric steps of a run, in order (read straight from SQLite). */
export async function metricSteps(t: TestApp, runId: string, series = 'train_bound'): Promise<number[]> {
  const rows: { step: number }[] = await t.orm.em.fork().getConnection().execute('select step from metric_points where run_id = ? and series = ? order by step', [runId, series]);
  return rows.map((r) => Number(r.step));
}
