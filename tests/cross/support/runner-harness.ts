/**
 * Real parts for the runner tests and the runner benchmark: the server (`startServer`, temporary SQLite file,
 * free loopback port), a private `redis-server` on a free port in a temp folder, runner processes
 * (`node --import tsx runner/main.ts`), and the few REST calls a test needs (admin, runner token, corpus, grid,
 * metrics, checkpoints). No mocks.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type { GridDto } from '../../../shared/api/grids';
import type { CheckpointDto, MetricSeriesPage, RunDto } from '../../../shared/api/runs';
import { loadConfig } from '../../../server/config';
import { startServer, type RunningServer } from '../../../server/start';

export interface HarnessServer {
  server: RunningServer;
  url: string;
  dir: string;
  stop(): Promise<void>;
}

/** A free TCP port on the loopback interface. */
export function freePort(): Promise<number> {
  return new Promise((ok, fail) => {
    const s = createServer();
    s.once('error', fail);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => ok(port));
    });
  });
}

export async function waitFor<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs: number, everyMs = 250): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe().catch(() => null);
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`Timed out after ${timeoutMs} ms waiting for ${what}.`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

export interface RedisProcess { url: string; stop(): Promise<void> }

/** Debian's redis-server on a free loopback port, no persistence, its files in a temp folder. */
export async function startRedis(): Promise<RedisProcess> {
  const dir = mkdtempSync(join(tmpdir(), 'noisewright-redis-'));
  const port = await freePort();
  const child = spawn('redis-server', ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--dir', dir],
    { stdio: 'ignore' });
  const exited = new Promise<void>((r) => child.once('exit', () => r()));
  const url = `redis://127.0.0.1:${port}`;
  const { Redis } = await import('ioredis');
  await waitFor('redis-server to answer PING', async () => {
    const client = new Redis(url, { lazyConnect: true, maxRetriesPerRequest: 0, retryStrategy: () => null });
    client.on('error', () => undefined); // refused while redis-server starts: the probe just tries again
    try {
      await client.connect();
      return (await client.ping()) === 'PONG';
    } finally {
      client.disconnect();
    }
  }, 20_000, 100);
  return {
    url,
    async stop() {
      child.kill('SIGTERM');
      await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))]);
      if (child.exitCode === null) child.kill('SIGKILL');
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

export async function startHarnessServer(env: Record<string, string> = {}): Promise<HarnessServer> {
  const dir = mkdtempSync(join(tmpdir(), 'noisewright-runners-'));
  const config = loadConfig({
    NODE_ENV: 'test', PORT: '0', HOST: '127.0.0.1', DATABASE_PATH: join(dir, 'runners.sqlite'),
    SMTP_HOST: '127.0.0.1', SMTP_PORT: '0', MAIL_CAPTURE: 'true', MAIL_CAPTURE_FILE: 'none', SEED_DEMO: 'false',
    BCRYPT_COST: '4', AUTH_RATE_LIMIT: '1000', STATIC_DIR: join(dir, 'no-client'), RUNNER_THREADS: '0',
    ...env,
  });
  const server = await startServer(config);
  return {
    server, url: server.url, dir,
    async stop() {
      await server.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** A JSON (or form) call to the API that throws with the server's sentence on failure. */
export async function api<T>(base: string, path: string, token: string, init: RequestInit = {}): Promise<T> {
  const res = await fetch(`${base}/api${path}`, { ...init, headers: { ...(init.headers ?? {}), ...(token ? { Authorization: `Bearer ${token}` } : {}) } });
  if (!res.ok) throw new Error(`${init.method ?? 'GET'} ${path}: HTTP ${res.status} ${await res.text()}`);
  if (res.status === 204) return undefined as T;
  const type = res.headers.get('content-type') ?? '';
  return (type.includes('json') ? await res.json() : new Uint8Array(await res.arrayBuffer())) as T;
}

export const json = (body: unknown, method = 'POST'): RequestInit => ({ method, headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(body) });

export interface Lab { token: string; benchId: string; corpusId: string }

/** The instance admin (the first account), a bench, and a corpus of the demo syllable words. */
export async function openLab(base: string, words = 300): Promise<Lab> {
  const { token } = await api<{ token: string }>(base, '/auth/signup', '', json({ email: 'runa@example.org', password: 'long-enough-1', displayName: 'Runa Runner' }));
  const bench = await api<{ id: string }>(base, '/benches', token, json({ name: 'Runner lab' }));
  // datasets-demo/syllable-grammar.tsv: invented words (no personal data).
  const lines = readFileSync('datasets-demo/syllable-grammar.tsv', 'utf8').trim().split('\n').slice(0, words + 1);
  const form = new FormData();
  form.set('name', 'Syllables');
  form.set('options', JSON.stringify({ mergeDuplicates: true }));
  form.set('file', new Blob([`${lines.join('\n')}\n`]), 'syllables.tsv');
  const corpus = await api<{ id: string }>(base, `/benches/${bench.id}/corpora`, token, { method: 'POST', body: form });
  return { token, benchId: bench.id, corpusId: corpus.id };
}

/** A runner token made by the admin on the Runners routes (shown once). */
export async function runnerToken(base: string, lab: Lab, name: string): Promise<string> {
  return (await api<{ token: string }>(base, '/runners', lab.token, json({ name }))).token;
}

/** A tiny state-space model (a step takes milliseconds; validation figures only at the end), so a run ends within seconds. */
export function tinySettings(steps: number, checkpointEvery: number) {
  return {
    model: { stateSize: 4, generativeFlow: [{ kind: 'diag' }], inferenceFlow: [{ kind: 'diag' }], flowHidden: 8, encoderSize: 8, embeddingSize: 4, proposalHidden: 8, observationHidden: 0 },
    training: { steps, batchSize: 8, samples: 2, learningRate: 0.01, clipNorm: 5, evalEvery: 0, evalSamples: 4, checkpointEvery, seed: 1 },
  };
}

/** A grid of `seeds.length` runner runs that differ only in their seed. */
export async function createRunnerGrid(base: string, lab: Lab, name: string, seeds: number[], steps: number, checkpointEvery: number): Promise<GridDto> {
  return api<GridDto>(base, `/benches/${lab.benchId}/grids`, lab.token, json({
    name, corpusId: lab.corpusId, family: 'ssm', baseSettings: tinySettings(steps, checkpointEvery),
    axes: [{ key: 'training.seed', values: seeds }], figure: 'bestValidationBitsPerChar', placement: 'runners',
  }));
}

export async function runsOf(base: string, lab: Lab): Promise<RunDto[]> {
  return (await api<{ items: RunDto[] }>(base, `/benches/${lab.benchId}/runs?limit=100`, lab.token)).items;
}

export async function trainSteps(base: string, lab: Lab, runId: string): Promise<number[]> {
  const page = await api<MetricSeriesPage>(base, `/benches/${lab.benchId}/runs/${runId}/metrics?series=train_bound&limit=50000`, lab.token);
  return page.series['train_bound']?.steps ?? [];
}

/** The newest checkpoint's bytes of a run. */
export async function latestCheckpointBytes(base: string, lab: Lab, runId: string): Promise<{ dto: CheckpointDto; bytes: Uint8Array }> {
  const [dto] = await api<CheckpointDto[]>(base, `/benches/${lab.benchId}/runs/${runId}/checkpoints`, lab.token);
  if (!dto) throw new Error(`Run ${runId} has no checkpoint.`);
  const bytes = await api<Uint8Array>(base, `/benches/${lab.benchId}/runs/${runId}/checkpoints/${dto.id}/file`, lab.token);
  return { dto, bytes };
}

export interface RunnerProcess { child: ChildProcess; output: () => string; exited: Promise<number | null> }

/** `npm run runner` as a child process (node + tsx directly, so signals reach the runner itself). */
export function spawnRunner(args: string[]): RunnerProcess {
  const child = spawn(process.execPath, ['--import', 'tsx', resolve('runner/main.ts'), ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  child.stdout?.on('data', (d) => { out += String(d); });
  child.stderr?.on('data', (d) => { out += String(d); });
  const exited = new Promise<number | null>((r) => child.once('exit', (code) => r(code)));
  return { child, output: () => out, exited };
}
