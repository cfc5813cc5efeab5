import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import { MAX_METRIC_POINTS_PER_REQUEST, type MetricSeriesPage, type RunDto } from '../../../shared/api/runs';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { createRun, ssmRunBody, uploadCorpus } from './runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let run: RunDto;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  const corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Curves'));
});
afterAll(async () => t.close());

const api = () => request(t.app);
const url = () => `/api/benches/${f.benchId}/runs/${run.id}/metrics`;
const post = (points: unknown[]) => api().post(url()).set(bearer(f.tokens.member)).send({ points });

describe('metric points', () => {
  it('stores a batch and returns compact arrays per series, in step order', async () => {
    // Sent out of order on purpose; the answer must come back sorted by step.
    const points = [
      { series: 'train_bound', step: 3, value: -2.25 },
      { series: 'train_bound', step: 1, value: -3.5 },
      { series: 'train_bound', step: 2, value: -2.75 },
      { series: 'valid_bound', step: 2, value: -2.875 },
      { series: 'noise_mi', step: 2, value: 0.125 },
    ];
    const res = await post(points);
    expect(res.status).toBe(201);
    expect(res.body).toEqual({ stored: 5 });
    const all = await api().get(url()).set(bearer(f.tokens.viewer));
    expect(all.body as MetricSeriesPage).toEqual({
      series: {
        noise_mi: { steps: [2], values: [0.125] },
        train_bound: { steps: [1, 2, 3], values: [-3.5, -2.75, -2.25] },
        valid_bound: { steps: [2], values: [-2.875] },
      },
      truncated: false,
    });
    const since = await api().get(`${url()}?series=train_bound&sinceStep=1`).set(bearer(f.tokens.viewer));
    expect(since.body.series).toEqual({ train_bound: { steps: [2, 3], values: [-2.75, -2.25] } });
    const limited = await api().get(`${url()}?series=train_bound&limit=2`).set(bearer(f.tokens.viewer));
    expect(limited.body).toEqual({ series: { train_bound: { steps: [1, 2], values: [-3.5, -2.75] } }, truncated: true });
  });

  it('replaces the value of a step sent again (a resumed run) and truncates after a step', async () => {
    await post([{ series: 'train_bound', step: 3, value: -2.0 }, { series: 'train_bound', step: 4, value: -1.875 }]);
    const read = await api().get(`${url()}?series=train_bound`).set(bearer(f.tokens.viewer));
    expect(read.body.series.train_bound).toEqual({ steps: [1, 2, 3, 4], values: [-3.5, -2.75, -2.0, -1.875] });
    const cut = await api().delete(`${url()}?afterStep=2`).set(bearer(f.tokens.member));
    expect(cut.status).toBe(200);
    // Steps 3 and 4 of train_bound; valid_bound and noise_mi end at step 2.
    expect(cut.body).toEqual({ removed: 2 });
    const after = await api().get(`${url()}?series=train_bound`).set(bearer(f.tokens.viewer));
    expect(after.body.series.train_bound.steps).toEqual([1, 2]);
  });

  it('refuses a batch over the size limit with 413 and stores none of it', async () => {
    const before = await countRows(t, 'metric_points');
    const points = Array.from({ length: MAX_METRIC_POINTS_PER_REQUEST + 1 }, (_, i) => ({ series: 'train_bound', step: 100 + i, value: -1 }));
    const res = await post(points);
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe(ErrorCode.PayloadTooLarge);
    expect(res.body.error.message).toMatch(/at most 5000/);
    expect(await countRows(t, 'metric_points')).toBe(before);
  });

  it('accepts a batch of exactly the limit in one go', async () => {
    const before = await countRows(t, 'metric_points');
    const points = Array.from({ length: MAX_METRIC_POINTS_PER_REQUEST }, (_, i) => ({ series: 'obs_entropy', step: i, value: i / 1000 }));
    expect((await post(points)).status).toBe(201);
    expect(await countRows(t, 'metric_points')).toBe(before + MAX_METRIC_POINTS_PER_REQUEST);
  });

  it('refuses a batch with one bad point, naming it, and stores none of the good ones', async () => {
    const before = await countRows(t, 'metric_points');
    const res = await post([
      { series: 'train_bound', step: 900, value: -1 },
      { series: 'Train Bound', step: 901, value: -1 },
      { series: 'train_bound', step: -4, value: -1 },
      { series: 'train_bound', step: 903, value: null },
    ]);
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['points.1.series', 'points.2.step', 'points.3.value']);
    expect(await countRows(t, 'metric_points')).toBe(before);
    expect((await post([])).status).toBe(422);
  });

  it('keeps one point per run, series and step when the same batch arrives twice (a retry after a lost answer)', async () => {
    const batch = [
      { series: 'train_bound', step: 700, value: -1.5 },
      { series: 'train_bound', step: 701, value: -1.25 },
      { series: 'valid_bound', step: 700, value: -1.75 },
    ];
    const rowsOfRun = async () => Number(((await t.orm.em.fork().getConnection().execute('select count(*) as n from metric_points where run_id = ?', [run.id])) as { n: number }[])[0]!.n);
    const before = await rowsOfRun();
    expect((await post(batch)).status).toBe(201);
    expect(await rowsOfRun()).toBe(before + 3);
    // The retry overlaps the first send and carries one new point.
    expect((await post([...batch, { series: 'train_bound', step: 702, value: -1.125 }])).status).toBe(201);
    expect(await rowsOfRun()).toBe(before + 4);
    const read = await api().get(`${url()}?series=train_bound&sinceStep=699`).set(bearer(f.tokens.viewer));
    expect(read.body.series.train_bound).toEqual({ steps: [700, 701, 702], values: [-1.5, -1.25, -1.125] });
  });

  it('refuses new points for an archived run', async () => {
    await api().patch(`/api/benches/${f.benchId}/runs/${run.id}`).set(bearer(f.tokens.member)).send({ status: 'stopped' });
    await api().post(`/api/benches/${f.benchId}/runs/${run.id}/archive`).set(bearer(f.tokens.member)).send({});
    const res = await post([{ series: 'train_bound', step: 5000, value: -1 }]);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/restore it/);
  });
});
