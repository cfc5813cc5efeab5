import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { CheckpointDto, RunDto } from '../../../shared/api/runs';
import { decodeCheckpoint } from '../../../shared/model/checkpoint';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { binaryBody, checkpointBytesWith, createRun, gruCheckpointBytes, ssmCheckpointBytes, ssmRunBody, tinySsmModel, uploadCorpus } from './runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpus: { id: string; alphabet: string[] };
let run: RunDto;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Saved often'));
});
afterAll(async () => t.close());

const api = () => request(t.app);
const runUrl = () => `/api/benches/${f.benchId}/runs/${run.id}`;
const upload = (bytes: Uint8Array, query = '') =>
  api().post(`${runUrl()}/checkpoints${query}`).set(bearer(f.tokens.member)).set('Content-Type', 'application/octet-stream').send(Buffer.from(bytes));


describe('checkpoint upload and download', () => {
  it('stores a checkpoint and gives back exactly the same bytes', async () => {
    const bytes = ssmCheckpointBytes(corpus.alphabet, { step: 120 });
    const res = await upload(bytes, '?reason=manual&boundBitsPerChar=2.5');
    expect(res.status).toBe(201);
    const saved = res.body as CheckpointDto;
    expect(saved).toMatchObject({ step: 120, reason: 'manual', boundBitsPerChar: 2.5, formatVersion: 1, byteSize: bytes.length });

    const list = await api().get(`${runUrl()}/checkpoints`).set(bearer(f.tokens.viewer));
    expect(list.body).toEqual([saved]);
    expect(JSON.stringify(list.body)).not.toContain('bytes');

    const file = await api().get(`${runUrl()}/checkpoints/${saved.id}/file`).set(bearer(f.tokens.viewer)).buffer(true).parse(binaryBody);
    expect(file.status).toBe(200);
    expect(file.headers['content-type']).toBe('application/octet-stream');
    // RFC 6266 allows the file name as a token or a quoted string.
    expect(file.headers['content-disposition']).toMatch(/^attachment; filename="?Saved-often-step-120\.nwck"?$/);
    expect(Buffer.compare(file.body as Buffer, Buffer.from(bytes))).toBe(0);
    // The weights survive bit for bit, including -0 and a subnormal value.
    const back = decodeCheckpoint(new Uint8Array(file.body as Buffer));
    const original = decodeCheckpoint(bytes);
    for (const [name, tensor] of Object.entries(original.weights)) {
      expect(Array.from(back.weights[name]!.values).every((v, i) => Object.is(v, tensor.values[i]))).toBe(true);
    }
    const run2 = await api().get(runUrl()).set(bearer(f.tokens.viewer));
    expect(run2.body.checkpointCount).toBe(1);
  });

  it.each([
    ['a file that is not a checkpoint', () => new TextEncoder().encode('word\tcount\nabba\t3\n'), /not a Noisewright checkpoint/],
    ['a truncated file', () => ssmCheckpointBytes(['a', 'b', 'c']).slice(0, -6), /incomplete/],
    [
      'another format version',
      () => {
        const b = ssmCheckpointBytes(['a', 'b', 'c']);
        new DataView(b.buffer, b.byteOffset).setUint32(4, 99, true);
        return b;
      },
      /format version 99/,
    ],
    ['another state size', () => ssmCheckpointBytes(['a', 'b', 'c'], { model: { ...tinySsmModel, stateSize: 3 } }), /stateSize is 3 in the checkpoint but 2 in this run/],
    ['another flow', () => ssmCheckpointBytes(['a', 'b', 'c'], { model: { ...tinySsmModel, generativeFlow: [{ kind: 'tril' as 'diag' }] } }), /generativeFlow/],
    ['another alphabet', () => ssmCheckpointBytes(['a', 'b', 'd']), /alphabet/],
    ['another model family', () => gruCheckpointBytes(['a', 'b', 'c']), /GRU baseline/],
    [
      'weights that do not fit their settings',
      () => {
        // An SSM checkpoint whose settings claim state size 2 but whose weights were made for state size 3.
        const wrong = decodeCheckpoint(ssmCheckpointBytes(['a', 'b', 'c'], { model: { ...tinySsmModel, stateSize: 3 } }));
        const right = decodeCheckpoint(ssmCheckpointBytes(['a', 'b', 'c']));
        return checkpointBytesWith('ssm', right.settings, ['a', 'b', 'c'], wrong.weights);
      },
      /shape/,
    ],
  ])('refuses %s with 422 and stores nothing', async (_label, make, message) => {
    const before = await countRows(t, 'checkpoints');
    const res = await upload(make());
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe(ErrorCode.CheckpointUnusable);
    expect(res.body.error.message).toMatch(message);
    expect(await countRows(t, 'checkpoints')).toBe(before);
  });

  it('refuses a body that is not sent as octet-stream', async () => {
    const res = await api().post(`${runUrl()}/checkpoints`).set(bearer(f.tokens.member)).send({ weights: [1, 2, 3] });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/application\/octet-stream/);
  });

  it('keeps only the newest automatic checkpoints', async () => {
    for (let step = 1; step <= 12; step++) {
      t.clock.advance(1000);
      expect((await upload(ssmCheckpointBytes(corpus.alphabet, { step: 200 + step }), '?reason=auto')).status).toBe(201);
    }
    const list = (await api().get(`${runUrl()}/checkpoints`).set(bearer(f.tokens.viewer))).body as CheckpointDto[];
    // AUTO_CHECKPOINTS_KEPT = 10 automatic ones (steps 203..212), plus the manual one of the first test.
    expect(list.filter((c) => c.reason === 'auto').map((c) => c.step)).toEqual([212, 211, 210, 209, 208, 207, 206, 205, 204, 203]);
    expect(list.filter((c) => c.reason === 'manual').map((c) => c.step)).toEqual([120]);
  });
});

describe('size limit', () => {
  it('refuses a checkpoint over MAX_CHECKPOINT_BYTES with 413 and stores nothing', async () => {
    const small = await createTestApp({ MAX_CHECKPOINT_BYTES: '1024' });
    try {
      const g = await createBenchFixture(small);
      const c = await uploadCorpus(small, g.benchId, g.tokens.member);
      const r = await createRun(small, g.benchId, g.tokens.member, ssmRunBody(c.id));
      const bytes = ssmCheckpointBytes(c.alphabet);
      expect(bytes.length).toBeGreaterThan(1024);
      const res = await request(small.app)
        .post(`/api/benches/${g.benchId}/runs/${r.id}/checkpoints`)
        .set(bearer(g.tokens.member))
        .set('Content-Type', 'application/octet-stream')
        .send(Buffer.from(bytes));
      expect(res.status).toBe(413);
      expect(res.body.error.message).toMatch(/limit of 1 kB/);
      const imported = await request(small.app).post(`/api/benches/${g.benchId}/runs/import`).set(bearer(g.tokens.member)).attach('file', Buffer.from(bytes), 'big.nwck');
      expect(imported.status).toBe(413);
      expect(await countRows(small, 'checkpoints')).toBe(0);
      expect(await countRows(small, 'runs')).toBe(1);
    } finally {
      await small.close();
    }
  });
});
