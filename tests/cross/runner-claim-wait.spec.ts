/**
 * A runner claim that waits for work (`waitSeconds`) does not hold up the server's shutdown: the real server
 * (`startServer`, embedded back-end, no runner threads of its own) is stopped while a claim waits 25 s, and the
 * claim is answered 204 and the stop completes long before that wait would have ended (the test's time limit
 * is the bound; no timing is asserted).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openLab, runnerToken, startHarnessServer, type HarnessServer } from './support/runner-harness';

let server: HarnessServer | null = null;
let token = '';

beforeAll(async () => {
  server = await startHarnessServer();
  token = await runnerToken(server.url, await openLab(server.url, 40), 'patient');
}, 60_000);

afterAll(async () => {
  await server?.stop();
}, 30_000);

describe('stopping the server while a claim waits', () => {
  it('answers the waiting claim and stops without waiting for it', async () => {
    const running = server!;
    const claim = fetch(`${running.url}/api/runner/claim`, {
      method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' }, body: JSON.stringify({ waitSeconds: 25 }),
    });
    // Lets the claim reach the server and begin its wait (nothing is queued, so it waits).
    await new Promise((r) => setTimeout(r, 1000));
    server = null;
    await running.stop();
    const res = await claim;
    expect(res.status).toBe(204);
  }, 15_000);
});
