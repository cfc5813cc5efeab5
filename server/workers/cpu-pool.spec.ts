// The CPU pool: bcrypt results made in a worker thread check out with bcryptjs on this thread (an
// independent run of the same library), a full queue answers 503 with Retry-After rather than a fault,
// and corpus analysis in a thread gives the same words as the parser run here.
import bcrypt from 'bcryptjs';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { corpusOptionsSchema } from '../../shared/api/corpora';
import { ErrorCode } from '../../shared/api/errors';
import { analyseUpload, wordRows } from '../modules/corpora/corpus-import';
import { savableFromPool } from '../modules/corpora/corpus-pool-result';
import { createTestApp, type TestApp } from '../testing/test-app';
import { configureCpuPool, cpuPool } from './cpu-pool';

describe('cpu pool', () => {
  it('hashes in a worker thread; the hash verifies on this thread and the compare agrees', async () => {
    const hash = await cpuPool.hash('correct horse battery', 4);
    expect(bcrypt.compareSync('correct horse battery', hash)).toBe(true);
    expect(await cpuPool.compare('correct horse battery', hash)).toBe(true);
    expect(await cpuPool.compare('wrong horse battery', hash)).toBe(false);
    expect(cpuPool.stats().running).toBeGreaterThanOrEqual(1);
  });

  it('analyses a corpus in a thread with the same rows as the parser on this thread', async () => {
    const text = 'word\tcount\nabba\t5\nbaba\t3\ncab\t2\nzeta\t9\n';
    const options = corpusOptionsSchema.parse({});
    const bytes = new TextEncoder().encode(text);
    const here = wordRows(analyseUpload(bytes, 'w.tsv', options));
    const there = savableFromPool('w.tsv', await cpuPool.analyse({ bytes: new TextEncoder().encode(text) }, 'w.tsv', options, true));
    expect(there.rows).toEqual(here);
    expect(there.parsed.alphabet.chars.length).toBeGreaterThan(0);
  });
});

describe('a full queue', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ WORKER_THREADS: '1', WORKER_QUEUE_LIMIT: '1', BCRYPT_COST: '10' });
  });
  afterAll(async () => {
    await t.close();
    configureCpuPool({ threads: 2, queueLimit: 200 });
  });

  it('answers 503 with Retry-After, never 500, and the rest succeed or fail normally', async () => {
    const tries = await Promise.all(
      Array.from({ length: 8 }, (_, i) => request(t.app).post('/api/auth/signin').send({ email: `someone${i}@example.org`, password: 'whatever it is' })),
    );
    const statuses = tries.map((r) => r.status);
    expect(statuses.every((s) => s === 401 || s === 503)).toBe(true);
    const busy = tries.filter((r) => r.status === 503);
    expect(busy.length).toBeGreaterThan(0);
    expect(busy[0]!.headers['retry-after']).toBe('5');
    expect(busy[0]!.body.error.code).toBe(ErrorCode.ServerBusy);
    expect(statuses).toContain(401);
  });
});
