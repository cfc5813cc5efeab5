import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { RunDto, RunPage, TrainingSet } from '../../../shared/api/runs';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { createRun, ssmRunBody, TINY_TSV, tinyTraining, uploadCorpus } from './runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpus: { id: string; alphabet: string[] };
let otherCorpus: { id: string; alphabet: string[] };

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  otherCorpus = await uploadCorpus(t, f.benchId, f.tokens.coach, 'word\tcount\nxy\t2\nyx\t1\nxxy\t1\n', 'Second words');
});
afterAll(async () => t.close());

const api = () => request(t.app);
const runsUrl = () => `/api/benches/${f.benchId}/runs`;

describe('creating runs', () => {
  it('creates a queued run with the corpus alphabet and the corpus split, and logs it', async () => {
    t.clock.advance(1000);
    const res = await api().post(runsUrl()).set(bearer(f.tokens.member)).send(ssmRunBody(corpus.id, '  First look  '));
    expect(res.status).toBe(201);
    const run = res.body as RunDto;
    expect(run).toMatchObject({ name: 'First look', family: 'ssm', status: 'queued', stepsDone: 0, archived: false, canControl: true });
    expect(run.corpus).toEqual({ id: corpus.id, name: 'Tiny words' });
    // The TSV above uses the letters a, b, c only.
    expect(run.alphabet).toEqual(['a', 'b', 'c']);
    // Defaults of the corpora module's upload options: shares 0.8 / 0.1 / 0.1 (see shared/data/split.ts DEFAULT_SPLIT_SHARES).
    expect(run.settings.split?.shares).toEqual({ train: 0.8, validation: 0.1, test: 0.1 });
    expect(run.settings.training).toMatchObject({ ...tinyTraining, evalEvery: 100, checkpointEvery: 500 });
    const activity = await api().get(`/api/benches/${f.benchId}/activity`).set(bearer(f.tokens.owner));
    expect(activity.body.items[0].kind).toBe('run.created');
  });

  it('keeps a split the request gives', async () => {
    const body = ssmRunBody(corpus.id, 'Own split');
    body.settings.split = { seed: 99, shares: { train: 0.5, validation: 0.25, test: 0.25 } };
    const run = await createRun(t, f.benchId, f.tokens.member, body);
    expect(run.settings.split).toEqual({ seed: 99, shares: { train: 0.5, validation: 0.25, test: 0.25 } });
  });

  it('refuses bad settings with one message per field and stores nothing', async () => {
    const before = await countRows(t, 'runs');
    const body = ssmRunBody(corpus.id);
    const settings = body.settings as { model: Record<string, unknown>; training: Record<string, unknown> };
    settings.model['stateSize'] = 0;
    settings.model['generativeFlow'] = [{ kind: 'spiral' }];
    settings.training['learningRate'] = -1;
    const res = await api().post(runsUrl()).set(bearer(f.tokens.member)).send(body);
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe(ErrorCode.ValidationFailed);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['settings.model.generativeFlow.0.kind', 'settings.model.stateSize', 'settings.training.learningRate']);
    expect(res.body.error.fields['settings.model.stateSize']).toMatch(/at least 1/);
    expect(await countRows(t, 'runs')).toBe(before);
  });

  it('refuses split shares that do not add up to 1', async () => {
    const body = ssmRunBody(corpus.id);
    body.settings.split = { seed: 1, shares: { train: 0.7, validation: 0.2, test: 0.2 } };
    const res = await api().post(runsUrl()).set(bearer(f.tokens.member)).send(body);
    expect(res.status).toBe(422);
    expect(res.body.error.fields['settings.split.shares']).toMatch(/add up to 1/);
  });

  it('refuses a split that leaves no word for training', async () => {
    const before = await countRows(t, 'runs');
    const body = ssmRunBody(corpus.id);
    // With a train share of 1e-9 a word lands in training only if its 32-bit hash is below 4.3 (shared/data/split.ts).
    body.settings.split = { seed: 3, shares: { train: 1e-9, validation: 0.5, test: 0.5 - 1e-9 } };
    const res = await api().post(runsUrl()).set(bearer(f.tokens.member)).send(body);
    expect(res.status).toBe(422);
    expect(res.body.error.fields['settings.split.shares']).toMatch(/training split/);
    expect(await countRows(t, 'runs')).toBe(before);
  });

  it('refuses a corpus of another bench as if it did not exist', async () => {
    const other = await api().post('/api/benches').set(bearer(f.tokens.member)).send({ name: 'Elsewhere' });
    const foreign = await uploadCorpus(t, other.body.id, f.tokens.member);
    const before = await countRows(t, 'runs');
    const res = await api().post(runsUrl()).set(bearer(f.tokens.member)).send(ssmRunBody(foreign.id));
    expect(res.status).toBe(422);
    expect(res.body.error.fields.corpusId).toMatch(/corpus of this bench/);
    expect(await countRows(t, 'runs')).toBe(before);
  });

  it('creates the two baselines', async () => {
    const gru = await createRun(t, f.benchId, f.tokens.coach, {
      family: 'gru',
      name: 'GRU at 8',
      corpusId: otherCorpus.id,
      settings: { model: { stateSize: 8, embeddingSize: 4, observationHidden: 0 }, training: { ...tinyTraining } },
    });
    expect(gru.family).toBe('gru');
    expect(gru.alphabet).toEqual(['x', 'y']);
    const ngram = await createRun(t, f.benchId, f.tokens.coach, { family: 'ngram', name: 'Trigram', corpusId: otherCorpus.id, settings: { model: { order: 3 } } });
    expect(ngram.settings.model).toEqual({ order: 3, discount: null });
    const bad = await api().post(runsUrl()).set(bearer(f.tokens.coach)).send({ family: 'ngram', name: 'Too long', corpusId: otherCorpus.id, settings: { model: { order: 9 } } });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fields['settings.model.order']).toMatch(/at most 6/);
  });
});

describe('listing runs', () => {
  it('pages, sorts, filters and reports the total', async () => {
    for (let i = 1; i <= 5; i++) {
      t.clock.advance(1000);
      await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, `Sweep ${i}`));
    }
    const page1 = await api().get(`${runsUrl()}?q=Sweep&sort=name&dir=asc&limit=2&offset=0`).set(bearer(f.tokens.viewer));
    expect(page1.status).toBe(200);
    expect((page1.body as RunPage).total).toBe(5);
    expect((page1.body as RunPage).items.map((r) => r.name)).toEqual(['Sweep 1', 'Sweep 2']);
    const page3 = await api().get(`${runsUrl()}?q=Sweep&sort=name&dir=asc&limit=2&offset=4`).set(bearer(f.tokens.viewer));
    expect((page3.body as RunPage).items.map((r) => r.name)).toEqual(['Sweep 5']);
    const newest = await api().get(`${runsUrl()}?q=Sweep&limit=1`).set(bearer(f.tokens.viewer));
    expect((newest.body as RunPage).items[0]!.name).toBe('Sweep 5');
    // A viewer sees every run but controls none.
    expect((newest.body as RunPage).items[0]!.canControl).toBe(false);

    const byCorpus = await api().get(`${runsUrl()}?corpusId=${otherCorpus.id}`).set(bearer(f.tokens.viewer));
    expect((byCorpus.body as RunPage).items.map((r) => r.name).sort()).toEqual(['GRU at 8', 'Trigram']);
    const byFamily = await api().get(`${runsUrl()}?family=gru,ngram`).set(bearer(f.tokens.viewer));
    expect((byFamily.body as RunPage).items.map((r) => r.family).sort()).toEqual(['gru', 'ngram']);
    const byStatus = await api().get(`${runsUrl()}?status=finished`).set(bearer(f.tokens.viewer));
    expect((byStatus.body as RunPage).total).toBe(0);
  });

  it('sorts by the best validation bound (a cost: lower is better)', async () => {
    const a = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Bound A'));
    const b = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Bound B'));
    await api().patch(`${runsUrl()}/${a.id}`).set(bearer(f.tokens.member)).send({ summary: { bestValidationBitsPerChar: 2.5 } });
    await api().patch(`${runsUrl()}/${b.id}`).set(bearer(f.tokens.member)).send({ summary: { bestValidationBitsPerChar: 1.75 } });
    const res = await api().get(`${runsUrl()}?q=Bound&sort=bestBound&dir=asc`).set(bearer(f.tokens.viewer));
    expect((res.body as RunPage).items.map((r) => r.name)).toEqual(['Bound B', 'Bound A']);
  });

  it('refuses unknown filters with a sentence', async () => {
    const res = await api().get(`${runsUrl()}?status=sleeping&sort=colour`).set(bearer(f.tokens.viewer));
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['sort', 'status.0']);
  });
});

describe('archive and delete', () => {
  it('refuses to archive or delete a run in progress, then archives, hides and deletes it', async () => {
    const run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Short-lived'));
    const url = `${runsUrl()}/${run.id}`;
    const early = await api().post(`${url}/archive`).set(bearer(f.tokens.member)).send({});
    expect(early.status).toBe(409);
    expect(early.body.error.code).toBe(ErrorCode.RunStatusConflict);
    expect((await api().delete(url).set(bearer(f.tokens.member))).status).toBe(409);
    expect((await api().patch(url).set(bearer(f.tokens.member)).send({ status: 'stopped' })).status).toBe(200);
    const archived = await api().post(`${url}/archive`).set(bearer(f.tokens.member)).send({ archived: true });
    expect(archived.status).toBe(200);
    expect(archived.body.archived).toBe(true);
    const listed = await api().get(`${runsUrl()}?q=Short`).set(bearer(f.tokens.viewer));
    expect(listed.body.total).toBe(0);
    const all = await api().get(`${runsUrl()}?q=Short&archived=all`).set(bearer(f.tokens.viewer));
    expect(all.body.total).toBe(1);
    const resume = await api().patch(url).set(bearer(f.tokens.member)).send({ status: 'training' });
    expect(resume.status).toBe(409);
    expect(resume.body.error.message).toMatch(/archived/);
    expect((await api().delete(url).set(bearer(f.tokens.member))).status).toBe(204);
    expect((await api().get(url).set(bearer(f.tokens.member))).status).toBe(404);
  });
});

describe('the corpus delete rule', () => {
  it('blocks deleting a corpus used by a run until the run is archived and the delete is confirmed', async () => {
    const used = await uploadCorpus(t, f.benchId, f.tokens.member, TINY_TSV, 'Used words');
    const run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(used.id, 'Uses it'));
    const corpusUrl = `/api/benches/${f.benchId}/corpora/${used.id}`;
    const blocked = await api().delete(corpusUrl).set(bearer(f.tokens.member));
    expect(blocked.status).toBe(409);
    expect(blocked.body.error.message).toMatch(/Uses it/);
    await api().patch(`${runsUrl()}/${run.id}`).set(bearer(f.tokens.member)).send({ status: 'stopped' });
    await api().post(`${runsUrl()}/${run.id}/archive`).set(bearer(f.tokens.member)).send({});
    expect((await api().delete(corpusUrl).set(bearer(f.tokens.member))).status).toBe(409);
    expect((await api().delete(`${corpusUrl}?confirmArchivedRuns=true`).set(bearer(f.tokens.member))).status).toBe(204);
    // The archived run stays, without its corpus.
    const after = await api().get(`${runsUrl()}/${run.id}`).set(bearer(f.tokens.member));
    expect(after.status).toBe(200);
    expect(after.body.corpus).toBeNull();
    expect(after.body.alphabet).toEqual(['a', 'b', 'c']);
  });
});

describe('training set', () => {
  it('gives every word with its count and split, in parallel arrays', async () => {
    const res = await api().get(`/api/benches/${f.benchId}/corpora/${corpus.id}/training-set`).set(bearer(f.tokens.viewer));
    expect(res.status).toBe(200);
    const set = res.body as TrainingSet;
    expect(set.alphabet).toEqual(['a', 'b', 'c']);
    // Parse the uploaded TSV independently of the corpora module.
    const expected = new Map(TINY_TSV.trim().split('\n').slice(1).map((line) => line.split('\t') as [string, string]).map(([w, c]) => [w, Number(c)]));
    expect(new Map(set.words.map((w, i) => [w, set.counts[i]]))).toEqual(expected);
    expect(set.splits).toHaveLength(set.words.length);
    expect(set.splits.every((s) => s === 'train' || s === 'validation' || s === 'test')).toBe(true);
    const outsider = await api().get(`/api/benches/${f.benchId}/corpora/${corpus.id}/training-set`).set(bearer(f.tokens.outsider));
    expect(outsider.status).toBe(404);
  });
});
