/** Command-line options of `npm run runner` (node:util parseArgs). */
import { availableParallelism } from 'node:os';
import { parseArgs } from 'node:util';
import { RUNNER_TOKEN_PATTERN } from '../shared/api/runner-jobs';
import type { RunnerOptions } from './runner';

export const RUNNER_HELP = `Train queued runs of a Noisewright server on this machine.

Usage: npm run runner -- --server <url> --token <runner token> [options]

  --server <url>        address of the server, e.g. http://10.0.0.5:4300              (required)
  --token <token>       runner token (nwr_...) made by the instance admin on the Runners page; or
                        the environment variable NOISEWRIGHT_RUNNER_TOKEN
  --queue <url>         redis://host:6379 when the server uses a queue (QUEUE_URL); without it the runner
                        asks the server for work
  --threads <n>         jobs trained at once, one per thread; one per core is best   (cores − 1, at least 1)
  --name <name>         name shown on the Runners page                                (host name)
  -h, --help            this text

Ctrl-C (or SIGTERM) saves a checkpoint of every job and hands it back to the queue before the runner ends.
When the server refuses the token (revoked by an admin, or made by another server) the runner says so and
ends with exit status 3; the server has already handed its jobs back to the queue.
`;

/** Parses argv (without node and script); null when help was asked for. */
export function parseRunnerArgs(argv: string[], env: Record<string, string | undefined> = {}): RunnerOptions | null {
  const { values: v } = parseArgs({
    args: argv, allowPositionals: false, strict: true,
    options: {
      server: { type: 'string' }, token: { type: 'string' }, queue: { type: 'string' }, threads: { type: 'string' },
      name: { type: 'string' }, help: { type: 'boolean', short: 'h' },
    },
  });
  if (v.help) return null;
  if (!v.server) throw new Error('Give the server address with --server <url> (see --help).');
  let server: URL;
  try {
    server = new URL(v.server);
  } catch {
    throw new Error(`--server must be an http(s) address like http://10.0.0.5:4300 (got "${v.server}").`);
  }
  if (server.protocol !== 'http:' && server.protocol !== 'https:') throw new Error(`--server must start with http:// or https:// (got "${v.server}").`);
  const token = v.token ?? env['NOISEWRIGHT_RUNNER_TOKEN'];
  if (!token) throw new Error('Give the runner token with --token nwr_... (the admin makes one on the Runners page).');
  if (!RUNNER_TOKEN_PATTERN.test(token)) throw new Error('--token must be a runner token: nwr_ followed by 43 letters, digits, - or _.');
  if (v.queue !== undefined && !/^rediss?:\/\/[^\s]+$/.test(v.queue)) throw new Error(`--queue must look like redis://host:6379 (got "${v.queue}").`);
  const fallback = Math.max(1, availableParallelism() - 1);
  const threads = v.threads === undefined ? fallback : Number(v.threads);
  if (!Number.isInteger(threads) || threads < 1 || threads > 256) throw new Error(`--threads must be a whole number from 1 to 256 (got "${v.threads}").`);
  const name = v.name?.trim();
  if (name !== undefined && (name.length === 0 || name.length > 80)) throw new Error('--name must have 1 to 80 characters.');
  return {
    serverUrl: server.href.replace(/\/+$/, ''), token, threads,
    ...(name ? { name } : {}), ...(v.queue ? { queueUrl: v.queue } : {}),
  };
}
