// Search text is literal: `%`, `_` and the escape character `\` match only themselves, in run search
// (SQL LIKE with an escape character) and in corpus word search (GLOB with escaped classes).
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { escapeLike } from '../../db/like-pattern';
import { createRun, ssmRunBody, uploadCorpus } from './runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
const names = ['plain run', '50% wider', 'a_b state', 'back\\slash', 'axb state'];

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  const corpus = await uploadCorpus(t, f.benchId, f.tokens.owner);
  for (const name of names) await createRun(t, f.benchId, f.tokens.owner, ssmRunBody(corpus.id, name));
});
afterAll(async () => t.close());

async function search(q: string): Promise<string[]> {
  const res = await request(t.app).get(`/api/benches/${f.benchId}/runs`).query({ q }).set(bearer(f.tokens.viewer));
  expect(res.status).toBe(200);
  return (res.body.items as { name: string }[]).map((r) => r.name).sort();
}

describe('run search', () => {
  it('escapes the wildcard and escape characters', () => {
    expect(escapeLike('50%_a\\b')).toBe('50\\%\\_a\\\\b');
  });

  it('% finds only names containing %', async () => {
    expect(await search('%')).toEqual(['50% wider']);
  });

  it('_ finds only names containing _ (not "axb")', async () => {
    expect(await search('a_b')).toEqual(['a_b state']);
  });

  it('the escape character \\ is a plain character', async () => {
    expect(await search('\\')).toEqual(['back\\slash']);
    expect(await search('k\\s')).toEqual(['back\\slash']);
  });

  it('ordinary text still matches in any ASCII letter case', async () => {
    expect(await search('STATE')).toEqual(['a_b state', 'axb state']);
  });
});

describe('corpus word search', () => {
  it('treats %, _ and \\ as plain characters', async () => {
    const corpus = await uploadCorpus(t, f.benchId, f.tokens.owner, 'word\tcount\nabc\t1\nab%\t1\nab_\t1\nab\\\t1\n', 'Odd words');
    const words = async (q: string) => {
      const res = await request(t.app).get(`/api/benches/${f.benchId}/corpora/${corpus.id}/words`).query({ q }).set(bearer(f.tokens.viewer));
      expect(res.status).toBe(200);
      return (res.body.items as { word: string }[]).map((w) => w.word).sort();
    };
    expect(await words('%')).toEqual(['ab%']);
    expect(await words('_')).toEqual(['ab_']);
    expect(await words('\\')).toEqual(['ab\\']);
    expect(await words('b')).toHaveLength(4);
  });
});
