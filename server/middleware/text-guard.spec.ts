// A NUL or a direction control anywhere in a request is a 422 that names the field, never a 500, and
// writes nothing; the routes the attack probes hit are tried one by one.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../shared/api/errors';
import { bearer, countAllRows, createBenchFixture, createTestApp, TEST_PASSWORD, type BenchFixture, type TestApp } from '../testing/test-app';
import { createRun, ssmRunBody, uploadCorpus } from '../modules/runs/runs-test-helpers';
import { findUnsafeText } from './text-guard';

let t: TestApp;
let f: BenchFixture;
let corpusId: string;
let runId: string;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpusId = (await uploadCorpus(t, f.benchId, f.tokens.owner)).id;
  runId = (await createRun(t, f.benchId, f.tokens.owner, ssmRunBody(corpusId))).id;
});
afterAll(async () => t.close());

function expect422(res: request.Response, field?: string) {
  expect(res.status).toBe(422);
  expect(res.body.error.code).toBe(ErrorCode.ValidationFailed);
  if (field) expect(Object.keys(res.body.error.fields ?? {})).toContain(field);
}

describe('findUnsafeText', () => {
  it('walks objects and arrays and names the path', () => {
    expect(findUnsafeText({ a: [{ b: 'ok' }, { b: 'x\u0000' }] })?.[0]).toBe('a.1.b');
    expect(findUnsafeText({ a: 'line one\nline two', b: ['\t'] })).toBeNull();
    expect(findUnsafeText({ ['k\u202e']: 1 })?.[1]).toMatch(/field name/);
  });
});

describe('NUL and direction controls in requests', () => {
  it('sign-up display name (no sign-in needed)', async () => {
    const before = await countAllRows(t);
    const res = await request(t.app).post('/api/auth/signup').send({ email: 'nul@example.org', password: TEST_PASSWORD, displayName: 'a\u0000b' });
    expect422(res, 'displayName');
    expect(res.body.error.fields.displayName).toMatch(/NUL/);
    expect(await countAllRows(t)).toEqual(before);
  });

  it('word search ?q=%00 and run search ?q=%00', async () => {
    expect422(await request(t.app).get(`/api/benches/${f.benchId}/corpora/${corpusId}/words?q=%00`).set(bearer(f.tokens.viewer)), 'q');
    expect422(await request(t.app).get(`/api/benches/${f.benchId}/runs?q=%00`).set(bearer(f.tokens.viewer)), 'q');
  });

  it('bench name, run name, run status reason, report title', async () => {
    const before = await countAllRows(t);
    expect422(await request(t.app).post('/api/benches').set(bearer(f.tokens.owner)).send({ name: 'x\u0000' }), 'name');
    expect422(await request(t.app).patch(`/api/benches/${f.benchId}`).set(bearer(f.tokens.owner)).send({ name: 'x\u202e' }), 'name');
    expect422(await request(t.app).patch(`/api/benches/${f.benchId}/runs/${runId}`).set(bearer(f.tokens.owner)).send({ name: 'r\u0000' }), 'name');
    expect422(await request(t.app).patch(`/api/benches/${f.benchId}/runs/${runId}`).set(bearer(f.tokens.owner)).send({ status: 'failed', statusReason: 'x\u0000' }), 'statusReason');
    expect422(await request(t.app).post(`/api/benches/${f.benchId}/reports`).set(bearer(f.tokens.owner)).send({ kind: 'grid', title: 't\u0000', sourceIds: [] }), 'title');
    expect(await countAllRows(t)).toEqual(before);
  });

  it('a NUL in a path segment is refused, not looked up', async () => {
    const res = await request(t.app).get(`/api/benches/${f.benchId}/runs/${runId}%00`).set(bearer(f.tokens.viewer));
    expect(res.status).toBe(422);
  });

  it('multipart corpus names go through the same rule', async () => {
    const res = await request(t.app)
      .post(`/api/benches/${f.benchId}/corpora`)
      .set(bearer(f.tokens.owner))
      .attach('file', Buffer.from('abc\n', 'utf8'), 'a.txt')
      .field('name', 'n\u0000');
    expect(res.status).toBe(422);
    expect(res.status).not.toBe(500);
  });

  it('line breaks stay allowed in a description but not in a name', async () => {
    const ok = await request(t.app).patch(`/api/benches/${f.benchId}`).set(bearer(f.tokens.owner)).send({ description: 'first line\nsecond line' });
    expect(ok.status).toBe(200);
    expect422(await request(t.app).patch(`/api/benches/${f.benchId}`).set(bearer(f.tokens.owner)).send({ name: 'two\nlines' }), 'name');
  });
});
