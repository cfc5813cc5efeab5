import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BenchSummary, Member } from '../shared/api/types';
import { loadConfig, type Config } from './config';
import { DEMO_BENCH_NAME, DEMO_PEOPLE } from './seeders/demo-seed';
import { startServer, type RunningServer } from './start';

let dir: string;
let config: Config;
let server: RunningServer | null = null;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'noisewright-start-'));
  config = loadConfig({
    NODE_ENV: 'development',
    PORT: '0',
    SMTP_PORT: '0',
    DATABASE_PATH: join(dir, 'db', 'app.sqlite'),
    BCRYPT_COST: '4',
    DEMO_PASSWORD: 'harbour-demo-pass',
    STATIC_DIR: join(dir, 'no-client'),
    RUNNER_THREADS: '0',
  });
});
afterAll(async () => {
  await server?.close();
  rmSync(dir, { recursive: true, force: true });
});

async function json<T>(path: string, init: RequestInit = {}, token?: string): Promise<{ status: number; body: T; headers: Headers }> {
  const headers = new Headers(init.headers);
  if (token) headers.set('Authorization', `Bearer ${token}`);
  if (init.body) headers.set('Content-Type', 'application/json');
  const res = await fetch(`${server!.url}${path}`, { ...init, headers });
  const text = await res.text();
  return { status: res.status, body: (text ? JSON.parse(text) : null) as T, headers: res.headers };
}

describe('startServer', () => {
  it('runs migrations, seeds the demo, starts the mail stand-in and listens on a free port', async () => {
    server = await startServer(config);
    expect(server.port).toBeGreaterThan(0);
    expect(server.seeded).toBe(true);
    expect(server.config.smtp.port).toBeGreaterThan(0);
    expect(server.config.publicUrl).toBe(server.url);
    const migrations: { name: string }[] = await server.orm.em.fork().getConnection().execute('select name from mikro_orm_migrations');
    expect(migrations.map((m) => m.name)).toContain('Migration20261202000000_foundation');
    const health = await json<{ ok: boolean }>('/api/health');
    expect(health.body).toEqual({ ok: true });
    expect(health.headers.get('cross-origin-embedder-policy')).toBe('require-corp');
  });

  it('offers the demo sign-in in development, and it works', async () => {
    const cfg = await json<{ demoSignIn: { email: string; password: string } }>('/api/config');
    expect(cfg.body.demoSignIn).toEqual({ email: 'demo@noisewright.local', password: 'harbour-demo-pass' });
    const signIn = await json<{ token: string; user: { isAdmin: boolean } }>('/api/auth/signin', {
      method: 'POST',
      body: JSON.stringify(cfg.body.demoSignIn),
    });
    expect(signIn.status).toBe(200);
    expect(signIn.body.user.isAdmin).toBe(true);
    const benches = await json<BenchSummary[]>('/api/benches', {}, signIn.body.token);
    const demo = benches.body.find((b) => b.name === DEMO_BENCH_NAME)!;
    const members = await json<Member[]>(`/api/benches/${demo.id}/members`, {}, signIn.body.token);
    const roles = new Set(members.body.map((m) => m.role));
    expect([...roles].sort()).toEqual(['coach', 'member', 'owner', 'viewer']);
    expect(members.body).toHaveLength(DEMO_PEOPLE.length + 1);
  });

  it('delivers mail over SMTP to the stand-in, with links to this server, readable by the admin', async () => {
    const person = DEMO_PEOPLE[2]!.email;
    const res = await json('/api/auth/reset/request', { method: 'POST', body: JSON.stringify({ email: person }) });
    expect(res.status).toBe(202);
    const mail = await server!.mailbox!.waitFor((m) => m.to === person);
    expect(mail.subject).toBe('Reset your Noisewright password');
    expect(mail.text).toContain(`${server!.url}/reset-password/`);
    expect(mail.html).toContain('<a href=');
    const admin = await json<{ token: string }>('/api/auth/signin', {
      method: 'POST',
      body: JSON.stringify({ email: 'demo@noisewright.local', password: 'harbour-demo-pass' }),
    });
    const captured = await json<{ to: string }[]>('/api/admin/mail', {}, admin.body.token);
    expect(captured.body[0]!.to).toBe(person);
    const file = join(dir, 'db', 'captured-mail.jsonl');
    expect(existsSync(file)).toBe(true);
    expect(readFileSync(file, 'utf8')).toContain(person);
  });

  it('restarts on the same database without seeding again, keeping captured mail', async () => {
    await server!.close();
    server = await startServer(config);
    expect(server.seeded).toBe(false);
    const users: { n: number }[] = await server.orm.em.fork().getConnection().execute('select count(*) as n from users');
    expect(Number(users[0]!.n)).toBe(DEMO_PEOPLE.length + 1);
    expect(server.mailbox!.list().some((m) => m.subject === 'Reset your Noisewright password')).toBe(true);
  });

  it('fails clearly when the port is taken, and releases what it opened', async () => {
    const clash = { ...config, port: server!.port, databasePath: join(dir, 'other.sqlite'), mailCaptureFile: '' };
    await expect(startServer(clash)).rejects.toThrow(/EADDRINUSE/);
  });
});
