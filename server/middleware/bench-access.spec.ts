import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../shared/api/errors';
import { ROLE_RANK, type Role } from '../../shared/api/types';
import { benchRouteTable, type BenchRouteCase } from '../testing/bench-route-table';
import { bearer, countAllRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../testing/test-app';

let t: TestApp;
let f: BenchFixture;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
});
afterAll(async () => t.close());

function call(route: BenchRouteCase, benchId: string, token?: string) {
  const url = `/api/benches/${benchId}${route.path({ someUserId: f.userIds.owner })}`;
  let req = request(t.app)[route.method](url);
  if (token) req = req.set(bearer(token));
  return route.body === undefined ? req : req.send(route.body as object);
}

const label = (r: BenchRouteCase) => `${r.method.toUpperCase()} /api/benches/:benchId${r.path({ someUserId: ':userId' })}`;

describe.each(benchRouteTable.map((r) => [label(r), r] as const))('%s', (_name, route) => {
  it('refuses callers who are not signed in with 401', async () => {
    const res = await call(route, f.benchId);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe(ErrorCode.NotSignedIn);
  });

  it('answers a non-member exactly as for a bench that does not exist (404)', async () => {
    const before = await countAllRows(t);
    const outsider = await call(route, f.benchId, f.tokens.outsider);
    const missing = await call(route, '00000000-0000-4000-8000-000000000000', f.tokens.outsider);
    expect(outsider.status).toBe(404);
    expect(outsider.body).toEqual(missing.body);
    expect(await countAllRows(t)).toEqual(before);
  });

  const tooLow = (['viewer', 'member', 'coach'] as Role[]).filter((role) => ROLE_RANK[role] < ROLE_RANK[route.minRole]);
  it.each(tooLow.length > 0 ? tooLow : (['none'] as const))('refuses role %s with 403 and writes nothing', async (role) => {
    if (role === 'none') {
      expect(route.minRole).toBe('viewer');
      return;
    }
    const before = await countAllRows(t);
    const res = await call(route, f.benchId, f.tokens[role]);
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe(ErrorCode.RoleTooLow);
    expect(await countAllRows(t)).toEqual(before);
  });

  if (route.method === 'get') {
    it.each(['viewer', 'member', 'coach', 'owner', 'admin'] as const)('lets %s read when allowed', async (who) => {
      const res = await call(route, f.benchId, f.tokens[who]);
      const rank = who === 'admin' ? ROLE_RANK.owner : ROLE_RANK[who];
      expect(res.status).toBe(rank >= ROLE_RANK[route.minRole] ? (route.allowedStatus ?? 200) : 403);
    });
  }
});

describe('bench loader', () => {
  it('treats a malformed bench id as not found', async () => {
    const res = await request(t.app).get('/api/benches/not-a-uuid/members').set(bearer(f.tokens.owner));
    expect(res.status).toBe(404);
  });
});
