import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { GridDto, LearnabilityVerdict } from '../../../shared/api/grids';
import type { RunDto } from '../../../shared/api/runs';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { uploadCorpus } from '../runs/runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpusId: string;
let grid: GridDto;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpusId = (await uploadCorpus(t, f.benchId, f.tokens.member)).id;
});
afterAll(async () => t.close());

const api = () => request(t.app);

/**
 * Hand-set best validation figures (costs in bits per character, lower is better) of the eleven runs, invented for
 * the check; the expected verdict below is worked out by hand from them.
 */
const BOUNDS: Record<string, number> = {
  'ngram-1': 4.2, 'ngram-2': 3.1, 'ngram-3': 2.6, 'ngram-4': 2.45, 'ngram-5': 2.5,
  'gru-8': 2.4, 'gru-16': 2.3, 'gru-32': 2.25,
  'ssm-8': 2.43, 'ssm-16': 2.41, 'ssm-32': 2.2,
};

describe('the learnability check', () => {
  it('creates the eleven runs with one training budget', async () => {
    const res = await api().post(`/api/benches/${f.benchId}/corpora/${corpusId}/learnability`).set(bearer(f.tokens.member)).send({ budgetSteps: 40 });
    expect(res.status).toBe(201);
    grid = res.body as GridDto;
    expect(grid.kind).toBe('learnability');
    expect(grid.cells.map((c) => c.values[0])).toEqual(Object.keys(BOUNDS));
    for (const cell of grid.cells) {
      const run = (await api().get(`/api/benches/${f.benchId}/runs/${cell.run!.id}`).set(bearer(f.tokens.viewer))).body as RunDto;
      const [family, size] = String(cell.values[0]).split('-');
      expect(run.family).toBe(family);
      expect(run.status).toBe('queued');
      const s = run.settings as { model: { order?: number; stateSize?: number }; training?: { steps: number } };
      if (family === 'ngram') expect(s.model.order).toBe(Number(size));
      else {
        expect(s.model.stateSize).toBe(Number(size));
        expect(s.training!.steps).toBe(40);
      }
    }
  });

  it('answers 404 for a corpus that is not in the bench and 422 for a bad budget', async () => {
    const missing = await api().post(`/api/benches/${f.benchId}/corpora/3f1c2a4e-8b7d-4c6a-9e2f-1a2b3c4d5e6f/learnability`).set(bearer(f.tokens.member)).send({ budgetSteps: 40 });
    expect(missing.status).toBe(404);
    const bad = await api().post(`/api/benches/${f.benchId}/corpora/${corpusId}/learnability`).set(bearer(f.tokens.member)).send({ budgetSteps: 0 });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fields.budgetSteps).toMatch(/at least 1/);
  });

  it('gives a partial verdict while runs are missing figures', async () => {
    const v = (await api().get(`/api/benches/${f.benchId}/grids/${grid.id}/verdict`).set(bearer(f.tokens.viewer))).body as LearnabilityVerdict;
    expect(v.complete).toBe(false);
    expect(v.ngramFloor).toBeNull();
    expect(v.comparisons.every((c) => c.onPar === null)).toBe(true);
  });

  it('computes the verdict table from the runs’ summaries (hand computation)', async () => {
    for (const cell of grid.cells) {
      const url = `/api/benches/${f.benchId}/runs/${cell.run!.id}`;
      await api().patch(url).set(bearer(f.tokens.member)).send({ status: 'training' }).expect(200);
      // Bits per word of the best validation step: 5 × bits per char here (an invented mean of 5 characters per word).
      const bpc = BOUNDS[String(cell.values[0])]!;
      await api().patch(url).set(bearer(f.tokens.member)).send({ status: 'finished', summary: { bestValidationBitsPerChar: bpc, bestValidationBitsPerWord: 5 * bpc } }).expect(200);
    }
    const res = await api().get(`/api/benches/${f.benchId}/grids/${grid.id}/verdict`).set(bearer(f.tokens.viewer));
    expect(res.status).toBe(200);
    const v = res.body as LearnabilityVerdict;
    expect(v.complete).toBe(true);
    expect(v.budgetSteps).toBe(40);
    // Hand computation: the lowest n-gram bits/char is the 4-gram's 2.45 (the 5-gram's 2.50 is higher).
    expect(v.ngramFloor!.order).toBe(4);
    expect(v.ngramFloor!.bitsPerChar).toBeCloseTo(2.45, 12);
    const row = (m: string) => v.rows.find((r) => r.model === m)!;
    expect(row('ngram-1').bitsPerChar).toBeCloseTo(4.2, 12);
    expect(row('ngram-1').gapToNgramFloor).toBeCloseTo(4.2 - 2.45, 12); // 1.75
    expect(row('gru-16').bitsPerWord).toBeCloseTo(5 * 2.3, 12); // bits per word beside bits per char
    expect(row('gru-16').gapToNgramFloor).toBeCloseTo(2.3 - 2.45, 12); // −0.15: better than the floor
    expect(row('ssm-32').gapToNgramFloor).toBeCloseTo(2.2 - 2.45, 12); // −0.25
    // Tolerance 0.05 bits/char (common practice, no source): 8 → 2.43 − 2.40 = 0.03 on par; 16 → 2.41 − 2.30 = 0.11 not;
    // 32 → 2.20 − 2.25 = −0.05 on par (better).
    expect(v.toleranceBits).toBe(0.05);
    expect(v.comparisons.map((c) => c.stateSize)).toEqual([8, 16, 32]);
    expect(v.comparisons[0]!.difference).toBeCloseTo(0.03, 12);
    expect(v.comparisons[1]!.difference).toBeCloseTo(0.11, 12);
    expect(v.comparisons[2]!.difference).toBeCloseTo(-0.05, 12);
    expect(v.comparisons.map((c) => c.onPar)).toEqual([true, false, true]);
  });

  it('has no verdict for a plain grid', async () => {
    const plain = await api().post(`/api/benches/${f.benchId}/grids`).set(bearer(f.tokens.member)).send({
      name: 'Sizes', corpusId, family: 'gru',
      baseSettings: { model: { embeddingSize: 4, observationHidden: 0 }, training: { steps: 10, batchSize: 4, learningRate: 0.01 } },
      axes: [{ key: 'model.stateSize', values: [8, 16] }],
    });
    expect(plain.status).toBe(201);
    const res = await api().get(`/api/benches/${f.benchId}/grids/${(plain.body as GridDto).id}/verdict`).set(bearer(f.tokens.viewer));
    expect(res.status).toBe(422);
  });
});
