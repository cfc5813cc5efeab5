import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../shared/api/errors';
import { bearer, createTestApp, signUp, TEST_PASSWORD, type TestApp } from './testing/test-app';

function expectIsolationHeaders(res: request.Response): void {
  expect(res.headers['cross-origin-opener-policy']).toBe('same-origin');
  expect(res.headers['cross-origin-embedder-policy']).toBe('require-corp');
}

describe('with a built client', () => {
  let t: TestApp;
  let clientDir: string;
  beforeAll(async () => {
    clientDir = mkdtempSync(join(tmpdir(), 'noisewright-client-'));
    mkdirSync(join(clientDir, 'tfjs-wasm'));
    writeFileSync(join(clientDir, 'index.html'), '<!doctype html><title>Noisewright test page</title>');
    writeFileSync(join(clientDir, 'main-ABC123.js'), 'console.log("hello")');
    writeFileSync(join(clientDir, 'tfjs-wasm', 'backend.wasm'), Buffer.from([0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00]));
    t = await createTestApp({ STATIC_DIR: clientDir });
  });
  afterAll(async () => {
    await t.close();
    rmSync(clientDir, { recursive: true, force: true });
  });

  it('serves static files with cross-origin isolation headers and the right type for wasm', async () => {
    const js = await request(t.app).get('/main-ABC123.js');
    expect(js.status).toBe(200);
    expect(js.text).toContain('hello');
    expectIsolationHeaders(js);
    const wasm = await request(t.app).get('/tfjs-wasm/backend.wasm');
    expect(wasm.headers['content-type']).toBe('application/wasm');
    expectIsolationHeaders(wasm);
  });

  it('falls back to index.html for client routes, with the CSP the app needs', async () => {
    const root = await request(t.app).get('/');
    expect(root.status).toBe(200);
    expect(root.text).toContain('Noisewright test page');
    const res = await request(t.app).get('/benches/123/runs');
    expect(res.status).toBe(200);
    expect(res.text).toContain('Noisewright test page');
    expectIsolationHeaders(res);
    const csp = res.headers['content-security-policy'] as string;
    expect(csp).toContain("script-src 'self' 'wasm-unsafe-eval'");
    expect(csp).toContain("worker-src 'self' blob:");
    expect(csp).toContain("style-src 'self' 'unsafe-inline'");
    expect(csp).toContain("img-src 'self' data: blob:");
    expect(csp).not.toContain('upgrade-insecure-requests');
  });

  it('answers a missing file with 404 instead of the app page', async () => {
    const res = await request(t.app).get('/tfjs-wasm/missing.wasm');
    expect(res.status).toBe(404);
    expectIsolationHeaders(res);
  });

  it('answers other methods on non-API paths with a JSON 404', async () => {
    const res = await request(t.app).post('/benches');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe(ErrorCode.NotFound);
    expectIsolationHeaders(res);
  });

  it('does not fall back to index.html for unknown API paths', async () => {
    const res = await request(t.app).get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe(ErrorCode.NotFound);
    expectIsolationHeaders(res);
  });
});

describe('API plumbing', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ JSON_BODY_LIMIT_BYTES: '2048' });
  });
  afterAll(async () => t.close());

  it('health and config answer, with isolation headers and no caching', async () => {
    const health = await request(t.app).get('/api/health');
    expect(health.body).toEqual({ ok: true });
    expectIsolationHeaders(health);
    expect(health.headers['cache-control']).toBe('no-store');
    const config = await request(t.app).get('/api/config');
    expect(config.body).toEqual({ devMode: true, maxUploadBytes: 5 * 1024 * 1024 });
  });

  it('a non-API path without a client build is a 404 with isolation headers', async () => {
    const res = await request(t.app).get('/sign-in');
    expect(res.status).toBe(404);
    expect(res.text).toMatch(/npm run build/);
    expectIsolationHeaders(res);
  });

  it('malformed JSON is a 400 in the error format', async () => {
    const res = await request(t.app).post('/api/auth/signin').set('Content-Type', 'application/json').send('{"email": "a@b.org",');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe(ErrorCode.MalformedRequest);
    expectIsolationHeaders(res);
  });

  it('a body over the JSON limit is a 413 in the error format', async () => {
    const res = await request(t.app).post('/api/auth/signup').send({ email: 'big@example.org', password: TEST_PASSWORD, displayName: 'x'.repeat(4000) });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe(ErrorCode.PayloadTooLarge);
  });

  it('a body that is not an object is a 422 with a sentence', async () => {
    const res = await request(t.app).post('/api/auth/signin').set('Content-Type', 'application/json').send('[1,2]');
    expect(res.status).toBe(422);
    expect(res.body.error.message).toMatch(/JSON object/);
  });

  it('admin pages: 401 signed out, 403 for a non-admin, users and captured mail for the admin', async () => {
    const admin = await signUp(t, 'root@example.org', 'Root');
    t.clock.advance(1000);
    const user = await signUp(t, 'plain@example.org', 'Plain');
    expect((await request(t.app).get('/api/admin/users')).status).toBe(401);
    expect((await request(t.app).get('/api/admin/users').set(bearer(user.token))).status).toBe(403);
    const users = await request(t.app).get('/api/admin/users').set(bearer(admin.token));
    expect(users.body.map((u: { email: string }) => u.email)).toEqual(['root@example.org', 'plain@example.org']);
    await request(t.app).post('/api/auth/reset/request').send({ email: 'plain@example.org' });
    await t.mailbox.waitFor((m) => m.to === 'plain@example.org');
    const mail = await request(t.app).get('/api/admin/mail').set(bearer(admin.token));
    expect(mail.status).toBe(200);
    expect(mail.body[0]).toMatchObject({ to: 'plain@example.org', subject: 'Reset your Noisewright password' });
    expect((await request(t.app).get('/api/admin/mail').set(bearer(user.token))).status).toBe(403);
  });
});

describe('rate limit on sign-in', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ AUTH_RATE_LIMIT: '3', AUTH_RATE_WINDOW_MS: '600000' });
  });
  afterAll(async () => t.close());

  it('answers 429 once the limit is used up, in the error format and with isolation headers', async () => {
    const attempt = () => request(t.app).post('/api/auth/signin').send({ email: 'guess@example.org', password: 'guess guess' });
    for (let i = 0; i < 3; i++) expect((await attempt()).status).toBe(401);
    const limited = await attempt();
    expect(limited.status).toBe(429);
    expect(limited.body.error.code).toBe(ErrorCode.RateLimited);
    expect(limited.body.error.message).toMatch(/Wait 10 minutes/);
    expectIsolationHeaders(limited);
    // Other routes are not affected.
    expect((await request(t.app).get('/api/health')).status).toBe(200);
  });
});

describe('rate limit behind a reverse proxy', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await createTestApp({ AUTH_RATE_LIMIT: '2', TRUST_PROXY_HOPS: '1' });
  });
  afterAll(async () => t.close());

  it('counts each forwarded client address on its own', async () => {
    const attempt = (ip: string) =>
      request(t.app).post('/api/auth/signin').set('X-Forwarded-For', ip).send({ email: 'guess@example.org', password: 'guess guess' });
    expect((await attempt('203.0.113.7')).status).toBe(401);
    expect((await attempt('203.0.113.7')).status).toBe(401);
    expect((await attempt('203.0.113.7')).status).toBe(429);
    expect((await attempt('198.51.100.23')).status).toBe(401);
  });
});

describe('in production', () => {
  let t: TestApp;
  beforeAll(async () => {
    // In production the first admin is named by ADMIN_EMAIL (or the setup code from the log).
    t = await createTestApp({ NODE_ENV: 'production', BCRYPT_COST: '10', PUBLIC_URL: 'https://workbench.test', ADMIN_EMAIL: 'prod.admin@example.org' });
  });
  afterAll(async () => t.close());

  it('hides the demo sign-in and the captured-mail page', async () => {
    const config = await request(t.app).get('/api/config');
    expect(config.body.devMode).toBe(false);
    expect(config.body.demoSignIn).toBeUndefined();
    const admin = await signUp(t, 'prod.admin@example.org');
    expect(admin.user.isAdmin).toBe(true);
    expect((await request(t.app).get('/api/admin/mail').set(bearer(admin.token))).status).toBe(404);
    expect((await request(t.app).get('/api/admin/users').set(bearer(admin.token))).status).toBe(200);
  });

  it('asks browsers to upgrade to HTTPS when PUBLIC_URL is https', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.headers['content-security-policy']).toContain('upgrade-insecure-requests');
    expect(res.headers['strict-transport-security']).toBeTruthy();
  });
});
