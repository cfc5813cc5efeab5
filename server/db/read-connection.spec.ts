// A file database has a second connection for reads: while a write transaction holds the write connection
// (as a large corpus upload does), pages are still answered, and they show the last committed state.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../testing/test-app';
import { uploadCorpus } from '../modules/runs/runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpusId: string;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpusId = (await uploadCorpus(t, f.benchId, f.tokens.member)).id;
});
afterAll(async () => t.close());

describe('the read connection', () => {
  it('answers reads while a write transaction is open, with the last committed data', async () => {
    let release!: () => void;
    const held = new Promise<void>((r) => (release = r));
    let written!: () => void;
    const wrote = new Promise<void>((r) => (written = r));
    const tx = t.orm.em.fork().transactional(async (em) => {
      await em.getConnection().execute('update corpora set description = ? where id = ?', ['not committed yet', corpusId], 'run', em.getTransactionContext());
      written();
      await held;
    });
    await wrote;
    try {
      const base = `/api/benches/${f.benchId}/corpora/${corpusId}`;
      const words = await request(t.app).get(`${base}/words?sort=count&limit=5`).set(bearer(f.tokens.viewer)).timeout(5000);
      expect(words.status).toBe(200);
      expect(words.body.items.length).toBeGreaterThan(0);
      const detail = await request(t.app).get(base).set(bearer(f.tokens.viewer)).timeout(5000);
      expect(detail.status).toBe(200);
      expect(detail.body.description).not.toBe('not committed yet');
    } finally {
      release();
      await tx;
    }
    const after = await request(t.app).get(`/api/benches/${f.benchId}/corpora/${corpusId}`).set(bearer(f.tokens.viewer));
    expect(after.body.description).toBe('not committed yet');
  });
});
