import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CorpusDetail, CorpusSummary, CorpusWordPage } from '../../../shared/api/corpora';
import { ErrorCode } from '../../../shared/api/errors';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { corpusRowCounts, upload } from './corpora-test-helpers';
import { registerCorpusUsageCheck } from './corpus-usage';

let t: TestApp;
let f: BenchFixture;
let corpusId: string;
const api = () => request(t.app);
const base = () => `/api/benches/${f.benchId}/corpora`;

// Counts chosen by hand so every sort order is distinguishable; 14 distinct letters (counted by hand).
const TSV = 'word\tcount\nmarrow\t9\nkel\t4\nanvil\t4\nsorrel\t1\nbee\t12\nzinnia\t2\n';

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  const res = await upload(t, f.benchId, f.tokens.member, { name: 'garden.tsv', content: TSV }, { name: 'Garden', options: { split: { train: 0.5, validation: 0.25, test: 0.25, seed: 3 } } });
  expect(res.status).toBe(201);
  corpusId = (res.body as CorpusDetail).id;
});
afterAll(async () => t.close());

describe('reading corpora', () => {
  it('lists the corpora of the bench for a viewer, who may not edit them', async () => {
    const res = await api().get(base()).set(bearer(f.tokens.viewer));
    expect(res.status).toBe(200);
    const list = res.body as CorpusSummary[];
    expect(list.map((c) => [c.name, c.types, c.tokens, c.alphabetSize, c.canEdit])).toEqual([['Garden', 6, 32, 14, false]]);
    expect(list[0]!.uploadedBy?.id).toBe(f.userIds.member);
  });

  it('sorts, filters and pages the words on the server', async () => {
    const page = async (query: string) => ((await api().get(`${base()}/${corpusId}/words?${query}`).set(bearer(f.tokens.viewer))).body as CorpusWordPage);
    expect((await page('sort=count&dir=desc')).items.map((w) => w.word)).toEqual(['bee', 'marrow', 'anvil', 'kel', 'zinnia', 'sorrel']);
    expect((await page('sort=word&dir=asc&limit=2&offset=1')).items.map((w) => w.word)).toEqual(['bee', 'kel']);
    expect((await page('sort=length&dir=asc')).items.map((w) => w.word)).toEqual(['bee', 'kel', 'anvil', 'marrow', 'sorrel', 'zinnia']);
    const filtered = await page('q=rr');
    expect(filtered.total).toBe(2);
    expect(filtered.items.map((w) => w.word).sort()).toEqual(['marrow', 'sorrel']);
    const all = await page('limit=100');
    for (const split of ['train', 'validation', 'test'] as const) {
      const part = await page(`split=${split}&limit=100`);
      expect(part.items.map((w) => w.word).sort()).toEqual(all.items.filter((w) => w.split === split).map((w) => w.word).sort());
    }
    const bad = await api().get(`${base()}/${corpusId}/words?sort=colour&limit=0`).set(bearer(f.tokens.viewer));
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['limit', 'sort']);
  });

  it('searches words in any letter case and keeps each spelling as its own row', async () => {
    // Counts chosen by hand; lower-casing off so the spellings stay apart.
    const mixed = 'word\tcount\nharbour\t5\nHarbour\t3\nHARBOUR\t2\nharbinger\t4\narbour\t1\nÄrger\t6\närgern\t7\n';
    // On a bench of its own, so the other tests' lists and activity stay as they expect.
    const bench = await api().post('/api/benches').set(bearer(f.tokens.member)).send({ name: 'Harbour words' });
    const res = await upload(t, bench.body.id, f.tokens.member, { name: 'mixed.tsv', content: mixed }, { name: 'Mixed case', options: { normalise: { lowerCase: false } } });
    expect(res.status).toBe(201);
    const words = `/api/benches/${bench.body.id}/corpora/${(res.body as CorpusDetail).id}/words`;
    const page = async (query: string) => ((await api().get(`${words}?${query}`).set(bearer(f.tokens.member))).body as CorpusWordPage);
    const harb = await page(`q=HARB&sort=count&dir=desc`);
    expect(harb.total).toBe(4);
    expect(harb.items.map((w) => [w.word, w.count])).toEqual([['harbour', 5], ['harbinger', 4], ['Harbour', 3], ['HARBOUR', 2]]);
    expect((await page('q=bour&limit=2&sort=word&dir=asc')).items.map((w) => w.word)).toEqual(['HARBOUR', 'Harbour']);
    expect((await page('q=bour')).total).toBe(4);
    // Beyond ASCII: SQLite's own LIKE would not fold Ä (sqlite.org/lang_expr.html, "The LIKE operator").
    expect((await page(`q=${encodeURIComponent('äRG')}&sort=word&dir=asc`)).items.map((w) => w.word)).toEqual(['Ärger', 'ärgern']);
    // GLOB wildcards in the search text are plain characters.
    expect((await page(`q=${encodeURIComponent('h*r')}`)).total).toBe(0);
    expect((await page(`q=${encodeURIComponent('?')}`)).total).toBe(0);
  });

  it('exports TSV that parses back to the same words and counts', async () => {
    const res = await api().get(`${base()}/${corpusId}/export.tsv`).set(bearer(f.tokens.viewer));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/tab-separated-values/);
    expect(res.headers['content-disposition']).toContain('Garden.tsv');
    // Independent reading: split lines and tabs by hand, not with our parser.
    const [header, ...lines] = res.text.trimEnd().split('\n');
    expect(header).toBe('word\tcount');
    const exported = new Map(lines.map((l) => l.split('\t') as [string, string]).map(([w, c]) => [w, Number(c)]));
    const original = new Map(TSV.trimEnd().split('\n').slice(1).map((l) => l.split('\t') as [string, string]).map(([w, c]) => [w, Number(c)]));
    expect(exported).toEqual(original);
  });

  it('answers 404 for a corpus of another bench or a made-up id', async () => {
    const other = await api().post('/api/benches').set(bearer(f.tokens.outsider)).send({ name: 'Elsewhere' });
    const res = await api().get(`/api/benches/${other.body.id}/corpora/${corpusId}`).set(bearer(f.tokens.outsider));
    expect(res.status).toBe(404);
    const madeUp = await api().get(`${base()}/not-a-uuid`).set(bearer(f.tokens.viewer));
    expect(madeUp.status).toBe(404);
  });

  it.each(['get', 'words', 'export', 'patch', 'delete'] as const)('hides an existing corpus from a non-member (%s → 404)', async (what) => {
    const url = `${base()}/${corpusId}${what === 'words' ? '/words' : what === 'export' ? '/export.tsv' : ''}`;
    const req = what === 'patch' ? api().patch(url).send({ name: 'x' }) : what === 'delete' ? api().delete(url) : api().get(url);
    const res = await req.set(bearer(f.tokens.outsider));
    expect(res.status).toBe(404);
  });
});

describe('changing and deleting', () => {
  it('a viewer cannot upload, rename or delete', async () => {
    const before = await corpusRowCounts(t);
    expect((await upload(t, f.benchId, f.tokens.viewer, { name: 'w.txt', content: 'alba\n' })).status).toBe(403);
    expect((await api().patch(`${base()}/${corpusId}`).set(bearer(f.tokens.viewer)).send({ name: 'Mine' })).status).toBe(403);
    expect((await api().delete(`${base()}/${corpusId}`).set(bearer(f.tokens.viewer))).status).toBe(403);
    expect(await corpusRowCounts(t)).toEqual(before);
  });

  it('the uploader renames and describes it; the change is logged', async () => {
    const res = await api().patch(`${base()}/${corpusId}`).set(bearer(f.tokens.member)).send({ name: 'Garden words', description: 'Plants' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ name: 'Garden words', description: 'Plants' });
    const log = await api().get(`/api/benches/${f.benchId}/activity`).set(bearer(f.tokens.coach));
    const kinds = log.body.items.map((e: { kind: string }) => e.kind);
    expect(kinds).toContain('corpus.updated');
    expect(kinds).toContain('corpus.uploaded');
    const empty = await api().patch(`${base()}/${corpusId}`).set(bearer(f.tokens.member)).send({});
    expect(empty.status).toBe(422);
  });

  it("a member cannot delete another member's corpus; a coach can", async () => {
    const own = await upload(t, f.benchId, f.tokens.coach, { name: 'c.txt', content: 'alba\nbrin\n' }, { name: 'Coach list' });
    const ownId = (own.body as CorpusDetail).id;
    const before = await corpusRowCounts(t);
    const refused = await api().delete(`${base()}/${ownId}`).set(bearer(f.tokens.member));
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toMatch(/uploaded "Coach list", a coach or an owner/);
    expect((await api().patch(`${base()}/${ownId}`).set(bearer(f.tokens.member)).send({ name: 'Taken' })).status).toBe(403);
    expect(await corpusRowCounts(t)).toEqual(before);
    // The coach deletes the member's corpus (with no runs registered, deleting is allowed).
    const words = await countRows(t, 'corpus_words');
    const res = await api().delete(`${base()}/${corpusId}`).set(bearer(f.tokens.coach));
    expect(res.status).toBe(204);
    expect(await countRows(t, 'corpus_words')).toBe(words - 6);
    expect((await api().get(`${base()}/${corpusId}`).set(bearer(f.tokens.viewer))).status).toBe(404);
  });

  it('refuses to delete while runs use the corpus; archived runs need confirming', async () => {
    const res = await upload(t, f.benchId, f.tokens.member, { name: 'r.txt', content: 'alba\nbrin\n' }, { name: 'Used' });
    const id = (res.body as CorpusDetail).id;
    let uses = [{ runId: 'r1', name: 'State size 8', archived: false }];
    const unregister = registerCorpusUsageCheck(async (_em, corpus) => (corpus === id ? uses : []));
    try {
      const active = await api().delete(`${base()}/${id}?confirmArchivedRuns=true`).set(bearer(f.tokens.owner));
      expect(active.status).toBe(409);
      expect(active.body.error.code).toBe(ErrorCode.CorpusInUse);
      expect(active.body.error.message).toContain('"State size 8"');
      uses = [{ runId: 'r1', name: 'State size 8', archived: true }];
      const unconfirmed = await api().delete(`${base()}/${id}`).set(bearer(f.tokens.owner));
      expect(unconfirmed.status).toBe(409);
      expect(unconfirmed.body.error.message).toMatch(/archived run/);
      expect((await api().get(`${base()}/${id}`).set(bearer(f.tokens.viewer))).status).toBe(200);
      const confirmed = await api().delete(`${base()}/${id}?confirmArchivedRuns=true`).set(bearer(f.tokens.owner));
      expect(confirmed.status).toBe(204);
    } finally {
      unregister();
    }
    const log = await api().get(`/api/benches/${f.benchId}/activity`).set(bearer(f.tokens.coach));
    expect(log.body.items.filter((e: { kind: string }) => e.kind === 'corpus.deleted')).toHaveLength(2);
  });

  it('deleting the bench removes its corpora and words', async () => {
    const bench = await api().post('/api/benches').set(bearer(f.tokens.viewer)).send({ name: 'Brief' });
    await upload(t, bench.body.id, f.tokens.viewer, { name: 'w.txt', content: 'alba\nbrin\nkel\n' });
    const before = await corpusRowCounts(t);
    expect((await api().delete(`/api/benches/${bench.body.id}`).set(bearer(f.tokens.viewer))).status).toBe(204);
    const after = await corpusRowCounts(t);
    expect([after.corpora, after.words]).toEqual([before.corpora - 1, before.words - 3]);
  });
});
