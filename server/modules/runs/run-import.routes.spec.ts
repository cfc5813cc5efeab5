import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { CheckpointDto, RunDto } from '../../../shared/api/runs';
import { encodeCheckpoint } from '../../../shared/model/checkpoint';
import { KneserNeyModel } from '../../../shared/model/ngram-kn';
import { alphabetFromChars } from '../../../shared/data/encode';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { binaryBody, gruCheckpointBytes, ssmCheckpointBytes, tinySsmModel, uploadCorpus } from './runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpus: { id: string; alphabet: string[] };

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
});
afterAll(async () => t.close());

const api = () => request(t.app);
const importUrl = () => `/api/benches/${f.benchId}/runs/import`;
const rows = async () => ({ runs: await countRows(t, 'runs'), checkpoints: await countRows(t, 'checkpoints') });


describe('importing a checkpoint file as a new run', () => {
  it('creates a stopped run with the checkpoint’s model settings and keeps the file bit for bit', async () => {
    const bytes = ssmCheckpointBytes(corpus.alphabet, { step: 340 });
    const res = await api().post(importUrl()).set(bearer(f.tokens.member)).attach('file', Buffer.from(bytes), 'night-shift.nwck').field('corpusId', corpus.id);
    expect(res.status).toBe(201);
    const run = res.body as RunDto;
    expect(run).toMatchObject({ name: 'night-shift', family: 'ssm', status: 'stopped', stepsDone: 340, canControl: true });
    expect(run.settings.model).toEqual(tinySsmModel);
    expect(run.corpus?.id).toBe(corpus.id);
    expect(run.alphabet).toEqual(corpus.alphabet);
    const list = (await api().get(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints`).set(bearer(f.tokens.viewer))).body as CheckpointDto[];
    expect(list.map((c) => [c.step, c.reason, c.byteSize])).toEqual([[340, 'import', bytes.length]]);
    const file = await api().get(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints/${list[0]!.id}/file`).set(bearer(f.tokens.viewer)).buffer(true).parse(binaryBody);
    expect(Buffer.compare(file.body as Buffer, Buffer.from(bytes))).toBe(0);
    // The imported run accepts further checkpoints of the same model.
    const more = await api()
      .post(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints?reason=manual`)
      .set(bearer(f.tokens.member))
      .set('Content-Type', 'application/octet-stream')
      .send(Buffer.from(ssmCheckpointBytes(corpus.alphabet, { step: 400 })));
    expect(more.status).toBe(201);
  });

  it('imports a GRU and an n-gram checkpoint without a corpus', async () => {
    const gru = await api().post(importUrl()).set(bearer(f.tokens.member)).attach('file', Buffer.from(gruCheckpointBytes(['x', 'y'], 40)), 'gru.nwck').field('name', 'Old GRU');
    expect(gru.status).toBe(201);
    expect(gru.body).toMatchObject({ name: 'Old GRU', family: 'gru', corpus: null, alphabet: ['x', 'y'], stepsDone: 40 });
    expect(gru.body.settings.model).toEqual({ stateSize: 2, embeddingSize: 2, observationHidden: 0 });

    const alphabet = alphabetFromChars(['a', 'b']);
    const model = KneserNeyModel.estimate([{ word: 'ab', count: 3 }, { word: 'ba', count: 1 }], alphabet, { order: 2 });
    const bytes = encodeCheckpoint({ family: 'ngram', settings: model.toJSON(), alphabet: ['a', 'b'], step: 0, seed: 1, weights: {}, createdAt: '2026-03-01T09:00:00.000Z' });
    const ngram = await api().post(importUrl()).set(bearer(f.tokens.member)).attach('file', Buffer.from(bytes), 'bigram.nwck');
    expect(ngram.status).toBe(201);
    expect(ngram.body.settings.model).toEqual({ order: 2, discount: null });
  });

  it('refuses a damaged file, a wrong corpus or no file with a sentence and stores nothing', async () => {
    const before = await rows();
    const garbage = await api().post(importUrl()).set(bearer(f.tokens.member)).attach('file', Buffer.from('not a checkpoint at all'), 'x.nwck');
    expect(garbage.status).toBe(422);
    expect(garbage.body.error.code).toBe(ErrorCode.CheckpointUnusable);
    const truncated = ssmCheckpointBytes(corpus.alphabet).slice(0, 40);
    const cut = await api().post(importUrl()).set(bearer(f.tokens.member)).attach('file', Buffer.from(truncated), 'cut.nwck');
    expect(cut.status).toBe(422);
    expect(cut.body.error.message).toMatch(/incomplete/);
    const otherAlphabet = await api()
      .post(importUrl())
      .set(bearer(f.tokens.member))
      .attach('file', Buffer.from(ssmCheckpointBytes(['q', 'r', 's'])), 'qrs.nwck')
      .field('corpusId', corpus.id);
    expect(otherAlphabet.status).toBe(422);
    expect(otherAlphabet.body.error.message).toMatch(/differ from the corpus/);
    const noFile = await api().post(importUrl()).set(bearer(f.tokens.member)).field('name', 'Nothing');
    expect(noFile.status).toBe(422);
    expect(noFile.body.error.fields.file).toMatch(/Choose a checkpoint file/);
    expect(await rows()).toEqual(before);
  });

  it('lets viewers not import', async () => {
    const res = await api().post(importUrl()).set(bearer(f.tokens.viewer)).attach('file', Buffer.from(gruCheckpointBytes(['x'])), 'g.nwck');
    expect(res.status).toBe(403);
  });
});
