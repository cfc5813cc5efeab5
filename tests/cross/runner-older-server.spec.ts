/**
 * The runner program against a server of an older version, whose claim route refuses `waitSeconds` (its strict body
 * schema answered 422 VALIDATION_FAILED for the unknown field, as `runnerClaimSchema` did before the field existed):
 * the runner says so once and falls back to claims without the field (backing off 0.5 → 5 s between empty answers). The
 * older server here is a small loopback HTTP server that answers the runner routes as that version did (nothing to
 * do), since a real older build is not at hand.
 */
import { createServer, type IncomingMessage, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startRunnerThreads, type RunnerHandle } from '../../runner/runner';
import { waitFor } from './support/runner-harness';

/** Bodies of the training claims the runner sent, in order. */
const claims: Record<string, unknown>[] = [];
let server: Server;
let url = '';
let runner: RunnerHandle | null = null;
let output = '';

const bodyOf = (req: IncomingMessage) =>
  new Promise<Record<string, unknown>>((resolve) => {
    let text = '';
    req.on('data', (d) => { text += String(d); });
    req.on('end', () => resolve(text ? (JSON.parse(text) as Record<string, unknown>) : {}));
  });

beforeAll(async () => {
  server = createServer((req, res) => {
    void bodyOf(req).then((body) => {
      if (req.url === '/api/runner/heartbeat') {
        res.writeHead(200, { 'Content-Type': 'application/json' }).end(JSON.stringify({ controls: [] }));
      } else if (req.url === '/api/runner/claim') {
        claims.push(body);
        if ('waitSeconds' in body) {
          // The older server's answer to an unknown field (fromZodError of a strict schema).
          res.writeHead(422, { 'Content-Type': 'application/json' })
            .end(JSON.stringify({ error: { code: 'VALIDATION_FAILED', message: 'Unrecognized key: "waitSeconds"', fields: { _: 'Unrecognized key: "waitSeconds"' } } }));
        } else {
          res.writeHead(204).end();
        }
      } else {
        res.writeHead(204).end(); // evaluations/claim: nothing waits
      }
    });
  });
  await new Promise<void>((ok) => server.listen(0, '127.0.0.1', ok));
  url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});

afterAll(async () => {
  await runner?.stop();
  await new Promise<void>((ok) => {
    server.close(() => ok());
    server.closeAllConnections();
  });
}, 90_000);

describe('a runner and a server that does not know waitSeconds', () => {
  it('asks once with waitSeconds, says the server does not wait, then claims without it', async () => {
    runner = startRunnerThreads({
      serverUrl: url, token: `nwr_${'a'.repeat(43)}`, threads: 1, name: 'older-server test', output: { write: (s: string) => { output += s; return true; }, isTTY: false },
    });
    await runner.ready();
    await waitFor('three claims', async () => claims.length >= 3, 60_000, 100);
    expect(claims[0]).toEqual({ waitSeconds: 20 });
    expect(claims.slice(1)).toEqual(claims.slice(1).map(() => ({})));
    expect(output).toMatch(/does not wait for work/);
  }, 120_000);
});
