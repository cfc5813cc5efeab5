/**
 * The server under load for `npm run bench:load`: a child process (`tsx server/main.ts`) on a free loopback
 * port with a temporary database, so the load generator does not share its event loop. Its output is kept
 * to count SQLITE_BUSY and faults afterwards.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

export interface ChildServer {
  url: string;
  output: () => string;
  dir: string;
  child: ChildProcess;
  stop(signal?: NodeJS.Signals): Promise<void>;
}

/** Starts the server and waits for its "running at" line (at most `timeoutMs`). */
export async function startChildServer(env: Record<string, string>, opts: { dir?: string; timeoutMs?: number } = {}): Promise<ChildServer> {
  const dir = opts.dir ?? mkdtempSync(join(tmpdir(), 'noisewright-load-'));
  const port = await freePort();
  let out = '';
  // LOAD_PROFILE_DIR=<dir>: the server writes a CPU profile there when it stops (for finding what holds the loop).
  const profile = process.env['LOAD_PROFILE_DIR'] ? ['--cpu-prof', `--cpu-prof-dir=${process.env['LOAD_PROFILE_DIR']}`] : [];
  const child = spawn(process.execPath, [...profile, '--import', 'tsx', 'server/main.ts'], {
    env: {
      ...process.env,
      NODE_ENV: 'development',
      HOST: '127.0.0.1',
      PORT: String(port),
      DATABASE_PATH: join(dir, 'load.sqlite'),
      SEED_DEMO: 'false',
      MAIL_CAPTURE: 'true',
      SMTP_PORT: '0',
      MAIL_CAPTURE_FILE: 'none',
      STATIC_DIR: join(dir, 'no-client'),
      UPLOAD_TEMP_DIR: join(dir, 'uploads'),
      LOG_LEVEL: 'warn',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (d: Buffer) => (out += d.toString()));
  child.stderr!.on('data', (d: Buffer) => (out += d.toString()));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + (opts.timeoutMs ?? 60_000);
  while (!out.includes('is running at')) {
    if (child.exitCode !== null) throw new Error(`the server stopped at start:\n${out}`);
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`the server did not start in time:\n${out}`);
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    url,
    dir,
    child,
    output: () => out,
    async stop(signal: NodeJS.Signals = 'SIGTERM') {
      if (child.exitCode === null) {
        const exited = new Promise((r) => child.once('exit', r));
        child.kill(signal);
        await Promise.race([exited, new Promise((r) => setTimeout(r, 10_000))]);
        if (child.exitCode === null) child.kill('SIGKILL');
      }
      if (!opts.dir) rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** A JSON request against the child server. */
export async function api<T>(url: string, method: string, path: string, body?: unknown, token?: string): Promise<{ status: number; body: T }> {
  const res = await fetch(`${url}/api${path}`, {
    method,
    headers: { ...(body !== undefined ? { 'Content-Type': 'application/json' } : {}), ...(token ? { Authorization: `Bearer ${token}` } : {}) },
    body: body !== undefined ? JSON.stringify(body) : undefined,
  });
  const text = await res.text();
  return { status: res.status, body: (text ? JSON.parse(text) : null) as T };
}

/** A multipart body with one file and text fields (for autocannon, which sends a fixed body). */
export function multipart(file: { name: string; bytes: Buffer }, fields: Record<string, string>): { body: Buffer; contentType: string } {
  const boundary = `----noisewright${Math.random().toString(16).slice(2)}`;
  const parts: Buffer[] = [];
  for (const [k, v] of Object.entries(fields)) {
    parts.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`));
  }
  parts.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${file.name}"\r\nContent-Type: text/plain\r\n\r\n`));
  parts.push(file.bytes, Buffer.from(`\r\n--${boundary}--\r\n`));
  return { body: Buffer.concat(parts), contentType: `multipart/form-data; boundary=${boundary}` };
}
