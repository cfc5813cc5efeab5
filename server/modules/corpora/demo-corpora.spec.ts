import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CorpusSummary } from '../../../shared/api/corpora';
import { seedDemoIfEmpty, DEMO_BENCH_NAME } from '../../seeders/demo-seed';
import { bearer, createTestApp, type TestApp } from '../../testing/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
  await seedDemoIfEmpty(t.orm, t.config, t.clock);
});
afterAll(async () => t.close());

describe('demo seed', () => {
  it('loads every demo corpus into the demo bench through the upload path', async () => {
    const signIn = await request(t.app).post('/api/auth/signin').send({ email: t.config.demoEmail, password: t.config.demoPassword });
    const token = signIn.body.token as string;
    const benches = await request(t.app).get('/api/benches').set(bearer(token));
    const bench = benches.body.find((b: { name: string }) => b.name === DEMO_BENCH_NAME);
    const res = await request(t.app).get(`/api/benches/${bench.id}/corpora`).set(bearer(token));
    const byName = Object.fromEntries((res.body as CorpusSummary[]).map((c) => [c.name, [c.types, c.tokens]]));
    // Type and token counts as documented in datasets-demo/README.md (written from the generators).
    expect(byName).toEqual({
      'Archipelago places': [3000, 35469],
      'Tea blends': [800, 16185],
      'Syllable grammar': [11090, 50000],
    });
  });
});
