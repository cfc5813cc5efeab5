/**
 * A throw-away `redis-server` for tests and benchmarks: loopback only, a free port, a temp folder, no
 * persistence; `stop()` ends exactly that process and removes the folder.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export interface TestRedis {
  url: string;
  port: number;
  stop(): Promise<void>;
}

async function freePort(): Promise<number> {
  return new Promise((done, fail) => {
    const probe = createServer();
    probe.once('error', fail);
    probe.listen(0, '127.0.0.1', () => {
      const port = (probe.address() as { port: number }).port;
      probe.close(() => done(port));
    });
  });
}

export async function startTestRedis(timeoutMs = 10_000): Promise<TestRedis> {
  const dir = mkdtempSync(join(tmpdir(), 'noisewright-redis-'));
  const port = await freePort();
  const child: ChildProcess = spawn('redis-server', ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--dir', dir], {
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  await new Promise<void>((done, fail) => {
    const timer = setTimeout(() => fail(new Error(`redis-server did not start within ${timeoutMs} ms:\n${output}`)), timeoutMs);
    const onData = (chunk: Buffer) => {
      output += chunk.toString();
      if (output.includes('Ready to accept connections')) {
        clearTimeout(timer);
        done();
      }
    };
    child.stdout!.on('data', onData);
    child.stderr!.on('data', onData);
    child.once('error', (error) => {
      clearTimeout(timer);
      fail(new Error(`redis-server could not be started (install the Debian package redis-server): ${error.message}`));
    });
    child.once('exit', (code) => {
      clearTimeout(timer);
      fail(new Error(`redis-server exited with code ${code}:\n${output}`));
    });
  });
  return {
    url: `redis://127.0.0.1:${port}`,
    port,
    async stop() {
      if (child.exitCode === null) {
        const exited = new Promise<void>((done) => child.once('exit', () => done()));
        child.kill('SIGTERM');
        await exited;
      }
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
