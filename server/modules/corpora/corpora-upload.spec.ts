import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CorpusDetail, CorpusInvalidBody, CorpusPreview, Problem } from '../../../shared/api/corpora';
import { ErrorCode } from '../../../shared/api/errors';
import { splitOf } from '../../../shared/data/split';
import { createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { corpusOptionsSchema } from '../../../shared/api/corpora';
import { ClientGoneError } from '../../middleware/client-gone';
import { Bench } from '../benches/bench.entity';
import { corpusRowCounts, savedWords, upload } from './corpora-test-helpers';
import { analyseUpload } from './corpus-import';
import { CorpusRepository } from './corpus.repository';

let t: TestApp;
let f: BenchFixture;
beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
});
afterAll(async () => t.close());

const latin1 = (text: string) => new Uint8Array([...text].map((c) => c.charCodeAt(0)));

/** Each bad file: what the API must name (problem code and line). */
const badInputs: { what: string; file: { name: string; content: string | Uint8Array }; options?: object; code: string; line: number | null }[] = [
  { what: 'an empty file', file: { name: 'empty.txt', content: '' }, code: 'empty-file', line: null },
  { what: 'a file of blank lines', file: { name: 'blank.txt', content: '\n \n' }, code: 'empty-file', line: null },
  { what: 'a binary file', file: { name: 'words.txt', content: new Uint8Array([0x61, 0x0a, 0x62, 0x00, 0x01]) }, code: 'binary-file', line: 2 },
  { what: 'a Latin-1 (non-UTF-8) file', file: { name: 'words.txt', content: latin1('anna\ncafé\n') }, code: 'not-utf8', line: 2 },
  { what: 'a wrong column count', file: { name: 'w.tsv', content: 'word\tcount\nalba\t3\nbrin\t2\t7\n' }, code: 'wrong-column-count', line: 3 },
  { what: 'a count that is not a whole number', file: { name: 'w.tsv', content: 'alba\t3\nbrin\t2.5\n' }, code: 'count-not-integer', line: 2 },
  { what: 'a count that is text', file: { name: 'w.csv', content: 'alba,3\nbrin,many\n' }, code: 'count-not-integer', line: 2 },
  { what: 'a negative count', file: { name: 'w.tsv', content: 'alba\t3\nbrin\t-2\n' }, code: 'count-negative', line: 2 },
  { what: 'a zero count', file: { name: 'w.csv', content: 'word,count\nalba,3\nbrin,0\n' }, code: 'count-zero', line: 3 },
  { what: 'a duplicate word', file: { name: 'w.tsv', content: 'alba\t3\nbrin\t2\nalba\t1\n' }, code: 'duplicate-word', line: 3 },
  { what: 'an over-long line', file: { name: 'w.txt', content: `alba\n${'x'.repeat(1500)}\n` }, code: 'line-too-long', line: 2 },
  { what: 'a word over the maximum length', file: { name: 'w.txt', content: 'alba\nbrindlewood\n' }, options: { maxWordLength: 8 }, code: 'word-too-long', line: 2 },
  { what: 'a word with a space', file: { name: 'w.txt', content: 'alba\nbrin dle\n' }, code: 'space-in-word', line: 2 },
  { what: 'a file of another type', file: { name: 'w.json', content: '["alba"]' }, code: 'unknown-format', line: null },
];

describe('uploading a bad file', () => {
  it.each(badInputs.map((b) => [b.what, b] as const))('refuses %s with 422, a line-numbered problem, and stores nothing', async (_what, bad) => {
    const before = await corpusRowCounts(t);
    const res = await upload(t, f.benchId, f.tokens.member, bad.file, { options: bad.options ?? {} });
    expect(res.status).toBe(422);
    const body = res.body as CorpusInvalidBody;
    expect(body.error.code).toBe(ErrorCode.CorpusInvalid);
    expect(body.error.message).toMatch(/^Nothing was saved/);
    const problem = body.error.problems.find((p: Problem) => p.code === bad.code);
    expect(problem, JSON.stringify(body.error.problems)).toBeDefined();
    expect(problem!.severity).toBe('error');
    expect(problem!.line).toBe(bad.line);
    // The line travels in `line` (the screen groups by it); per-line messages also name it.
    if (bad.line !== null && bad.code !== 'binary-file') expect(problem!.message).toContain(`Line ${bad.line}`);
    expect(await corpusRowCounts(t)).toEqual(before);
  });

  it('previews a bad file with 200, the same problems, and stores nothing', async () => {
    const before = await corpusRowCounts(t);
    const res = await upload(t, f.benchId, f.tokens.member, { name: 'w.tsv', content: 'alba\t3\nbrin\t-2\n' }, { preview: true });
    expect(res.status).toBe(200);
    const preview = res.body as CorpusPreview;
    expect(preview.ok).toBe(false);
    expect(preview.problems.map((p) => [p.line, p.code])).toEqual([[2, 'count-negative']]);
    expect(await corpusRowCounts(t)).toEqual(before);
  });

  it('merges duplicates when asked, adding their counts', async () => {
    const res = await upload(t, f.benchId, f.tokens.member, { name: 'w.tsv', content: 'alba\t3\nbrin\t2\nalba\t1\n' }, { options: { mergeDuplicates: true } });
    expect(res.status).toBe(201);
    const words = await savedWords(t, (res.body as CorpusDetail).id);
    expect(words.map((w) => [w.word, w.count])).toEqual([['alba', 4], ['brin', 2]]);
  });

  it('refuses invalid options with 422 naming the field, and stores nothing', async () => {
    const before = await corpusRowCounts(t);
    const res = await upload(t, f.benchId, f.tokens.member, { name: 'w.txt', content: 'alba\n' }, { options: { split: { train: 0.5, validation: 0.1, test: 0.1 } } as object });
    expect(res.status).toBe(422);
    expect(res.body.error.fields['options.split.train']).toMatch(/add up to 100 %/);
    const noName = await upload(t, f.benchId, f.tokens.member, { name: 'w.txt', content: 'alba\n' }, { name: '  ' });
    expect(noName.status).toBe(422);
    expect(noName.body.error.fields.name).toBe('Give the corpus a name.');
    expect(await corpusRowCounts(t)).toEqual(before);
  });

  it('refuses a request without a file with 422', async () => {
    const { default: request } = await import('supertest');
    const res = await request(t.app).post(`/api/benches/${f.benchId}/corpora/preview`).set({ Authorization: `Bearer ${f.tokens.member}` }).field('options', '{}');
    expect(res.status).toBe(422);
    expect(res.body.error.fields.file).toMatch(/Choose a file/);
  });
});

describe('characters outside the allowed set', () => {
  const file = { name: 'w.tsv', content: 'alba\t2\nbrin9\t1\nk-ra\t1\n' };
  const allowed = 'abcdefghijklmnopqrstuvwxyz';
  it.each([
    ['drop-word', [['alba', 2]]],
    ['drop-char', [['alba', 2], ['brin', 1], ['kra', 1]]],
    ['keep', [['alba', 2], ['brin9', 1], ['k-ra', 1]]],
  ] as const)('%s: saves the expected words and warns per line', async (policy, expected) => {
    const options = { normalise: { allowedChars: allowed, outsideAlphabet: policy } };
    const preview = (await upload(t, f.benchId, f.tokens.member, file, { options, preview: true })).body as CorpusPreview;
    expect(preview.ok).toBe(true);
    expect(preview.problems.filter((p) => p.code === 'outside-alphabet').map((p) => p.line)).toEqual([2, 3]);
    // Dropped token share: 2 of 4 tokens under drop-word, none otherwise (worked by hand).
    expect(preview.normalisation!.droppedTokenShare).toBe(policy === 'drop-word' ? 0.5 : 0);
    const res = await upload(t, f.benchId, f.tokens.member, file, { options });
    expect(res.status).toBe(201);
    const words = await savedWords(t, (res.body as CorpusDetail).id);
    expect(words.map((w) => [w.word, w.count])).toEqual(expected.map((e) => [...e]).sort());
  });
});

describe('a good upload', () => {
  it('saves the corpus and its words with splits and statistics', async () => {
    const before = await corpusRowCounts(t);
    // BOM, CRLF line ends, a header, trailing blanks, upper case and a decomposed "é" (e + U+0301).
    const content = '\uFEFFword\tcount\r\nAlba\t2 \r\nbrin\t1\r\nCafe\u0301\t1\r\n';
    const options = { split: { train: 0.5, validation: 0.25, test: 0.25, seed: 7 } };
    const res = await upload(t, f.benchId, f.tokens.member, { name: 'first.tsv', content }, { options, name: ' First words ', description: 'Three words' });
    expect(res.status).toBe(201);
    const corpus = res.body as CorpusDetail;
    expect(corpus).toMatchObject({ name: 'First words', description: 'Three words', fileName: 'first.tsv', format: 'tsv', types: 3, tokens: 4, canEdit: true });
    // Entropy of the counts (2, 1, 1)/4: 0.5·1 + 2·0.25·2 = 1.5 bits (closed form, worked by hand).
    expect(corpus.stats.unigramEntropyBits).toBeCloseTo(1.5, 12);
    // NFC composes e + U+0301 into U+00E9 (Unicode UAX #15); lower-casing gives "alba", "café".
    expect(corpus.alphabet).toEqual(['a', 'b', 'c', 'f', 'i', 'l', 'n', 'r', '\u00e9']);
    const words = await savedWords(t, corpus.id);
    expect(words.map((w) => [w.word, w.count, w.length])).toEqual([['alba', 2, 4], ['brin', 1, 4], ['caf\u00e9', 1, 4]]);
    const shares = { train: 0.5, validation: 0.25, test: 0.25 };
    for (const w of words) expect(w.split).toBe(splitOf(w.word, 7, shares));
    const counts = { train: 0, validation: 0, test: 0 } as Record<string, number>;
    for (const w of words) counts[w.split]! += 1;
    expect(Object.fromEntries(Object.entries(corpus.splitCounts).map(([k, v]) => [k, v.types]))).toEqual(counts);
    const after = await corpusRowCounts(t);
    expect(after).toEqual({ corpora: before.corpora + 1, words: before.words + 3, activity: before.activity + 1 });
  });

  it('saves 20,000 words in one request, all rows present', async () => {
    const lines = Array.from({ length: 20_000 }, (_, i) => `w${i.toString(36)}x\t${1 + (i % 17)}`);
    const before = await corpusRowCounts(t);
    const res = await upload(t, f.benchId, f.tokens.member, { name: 'big.tsv', content: `${lines.join('\n')}\n` }, { options: { normalise: { lowerCase: false } } });
    expect(res.status).toBe(201);
    expect((res.body as CorpusDetail).types).toBe(20_000);
    expect((await corpusRowCounts(t)).words).toBe(before.words + 20_000);
  });

  it('rolls the whole save back when the uploader goes away after some words were written', async () => {
    const lines = Array.from({ length: 3000 }, (_, i) => `q${i.toString(36)}z\t${1 + (i % 5)}`);
    const analysed = analyseUpload(new TextEncoder().encode(`${lines.join('\n')}\n`), 'gone.tsv', corpusOptionsSchema.parse({ normalise: { lowerCase: false } }));
    expect(analysed.parsed.ok).toBe(true);
    const before = await corpusRowCounts(t);
    // The connection "closes" once two chunks of words are in: the third check sees it.
    let checks = 0;
    const signal = { get aborted() { checks += 1; return checks > 2; } } as AbortSignal;
    const em = t.orm.em.fork();
    const bench = await em.findOneOrFail(Bench, { id: f.benchId });
    const saving = new CorpusRepository(em).save({ bench, user: null, name: 'Gone', description: '', upload: analysed, at: new Date(), signal });
    await expect(saving).rejects.toBeInstanceOf(ClientGoneError);
    expect(checks).toBe(3);
    expect(await corpusRowCounts(t)).toEqual(before);
    // The database connection was given back: the next upload is stored.
    const next = await upload(t, f.benchId, f.tokens.member, { name: 'after.txt', content: 'alba\nbrin\n' });
    expect(next.status).toBe(201);
  });
});

describe('upload size limit', () => {
  it('refuses a file over MAX_UPLOAD_BYTES with 413 stating the limit', async () => {
    const small = await createTestApp({ MAX_UPLOAD_BYTES: '2048' });
    try {
      const g = await createBenchFixture(small);
      const res = await upload(small, g.benchId, g.tokens.member, { name: 'w.txt', content: 'abcdefg\n'.repeat(400) });
      expect(res.status).toBe(413);
      expect(res.body.error.message).toContain('2 kB');
      expect((await corpusRowCounts(small)).corpora).toBe(0);
    } finally {
      await small.close();
    }
  });
});
