// Damaged checkpoints (non-finite weights, an impossible step, a negative or non-finite bound) are refused
// with 422 naming the problem, by upload and by import, and the run's previous good checkpoint stays.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { RunDto } from '../../../shared/api/runs';
import { encodeCheckpoint } from '../../../shared/model/checkpoint';
import { ssmParamSpecs } from '../../../shared/model/ssm-settings';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { createRun, handMadeWeights, ssmCheckpointBytes, ssmRunBody, ssmSettingsFor, uploadCorpus } from './runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpus: { id: string; alphabet: string[] };
let run: RunDto;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Diverges'));
});
afterAll(async () => t.close());

function damaged(opts: { step?: number; poison?: (w: ReturnType<typeof handMadeWeights>) => string } = {}): { bytes: Uint8Array; tensor: string } {
  const settings = ssmSettingsFor(corpus.alphabet);
  const weights = handMadeWeights(ssmParamSpecs(settings));
  const tensor = opts.poison ? opts.poison(weights) : '';
  const bytes = encodeCheckpoint({ family: 'ssm', settings, alphabet: corpus.alphabet, step: opts.step ?? 10, seed: 7, weights, createdAt: '2026-03-01T09:00:00.000Z' });
  return { bytes, tensor };
}

const upload = (bytes: Uint8Array, query = '') =>
  request(t.app)
    .post(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints${query}`)
    .set(bearer(f.tokens.member))
    .set('Content-Type', 'application/octet-stream')
    .send(Buffer.from(bytes));

const importFile = (bytes: Uint8Array) =>
  request(t.app).post(`/api/benches/${f.benchId}/runs/import`).set(bearer(f.tokens.member)).attach('file', Buffer.from(bytes), 'bad.nwck');

describe('damaged checkpoints', () => {
  let goodId: string;

  it('stores a good checkpoint first', async () => {
    const res = await upload(ssmCheckpointBytes(corpus.alphabet, { step: 50 }), '?reason=auto&boundBitsPerChar=2.25');
    expect(res.status).toBe(201);
    goodId = res.body.id;
  });

  const cases: [string, () => { bytes: Uint8Array; tensor: string }, RegExp][] = [
    ['all weights NaN', () => damaged({ poison: (w) => { for (const k of Object.keys(w)) w[k]!.values.fill(NaN); return Object.keys(w).sort()[0]!; } }), /holds NaN/],
    ['one weight +Infinity', () => damaged({ poison: (w) => { const k = Object.keys(w).sort().at(-1)!; w[k]!.values[1] = Infinity; return k; } }), /holds \+Infinity \(at index 1\)/],
    ['step 1e300', () => damaged({ step: 1e300 }), /step .* outside 0 … 1,000,000,000/],
    ['step -1', () => damaged({ step: -1 }), /step/],
  ];

  it.each(cases)('upload: %s → 422 naming the problem, nothing stored', async (_name, make, message) => {
    const before = await countRows(t, 'checkpoints');
    const { bytes, tensor } = make();
    const res = await upload(bytes, '?reason=auto');
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe(ErrorCode.CheckpointUnusable);
    expect(res.body.error.message).toMatch(message);
    if (tensor) expect(res.body.error.message).toContain(`"${tensor}"`);
    expect(await countRows(t, 'checkpoints')).toBe(before);
  });

  it.each(cases)('import: %s → 422, no run created', async (_name, make, message) => {
    const runsBefore = await countRows(t, 'runs');
    const res = await importFile(make().bytes);
    expect(res.status).toBe(422);
    expect(res.body.error.message).toMatch(message);
    expect(await countRows(t, 'runs')).toBe(runsBefore);
  });

  it.each(['-1', 'Infinity', 'NaN', '1e400'])('a bound of %s is refused', async (bound) => {
    const before = await countRows(t, 'checkpoints');
    const res = await upload(ssmCheckpointBytes(corpus.alphabet, { step: 60 }), `?boundBitsPerChar=${bound}`);
    expect(res.status).toBe(422);
    expect(await countRows(t, 'checkpoints')).toBe(before);
  });

  it('the previous good checkpoint is still the newest, with its bytes', async () => {
    const list = await request(t.app).get(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints`).set(bearer(f.tokens.viewer));
    expect(list.body[0]).toMatchObject({ id: goodId, step: 50, boundBitsPerChar: 2.25 });
    const file = await request(t.app).get(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints/${goodId}/file`).set(bearer(f.tokens.viewer));
    expect(file.status).toBe(200);
  });

  it('an import name with a direction control is refused', async () => {
    const res = await request(t.app)
      .post(`/api/benches/${f.benchId}/runs/import`)
      .set(bearer(f.tokens.member))
      .attach('file', Buffer.from(ssmCheckpointBytes(corpus.alphabet)), 'ok.nwck')
      .field('name', 'evil\u202ename');
    expect(res.status).toBe(422);
    expect(res.body.error.fields.name).toMatch(/U\+202E/);
  });
});
