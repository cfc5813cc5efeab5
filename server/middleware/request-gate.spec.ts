// The request line: at most `limit` requests at once, health never waits, and a response that becomes an
// event stream gives its place back when it starts (leaveRequestLine).
import express from 'express';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { afterEach, describe, expect, it } from 'vitest';
import { leaveRequestLine, requestGate } from './request-gate';

let server: Server | null = null;
afterEach(async () => {
  server?.closeAllConnections();
  await new Promise((r) => server?.close(r));
  server = null;
});

/** An app with a gate of one place: /slow answers when `finishSlow` is called, /stream streams until closed. */
async function gatedApp() {
  const app = express();
  const holds: (() => void)[] = [];
  app.use(requestGate(1, (req) => req.path === '/health'));
  app.get('/health', (_req, res) => res.json({ ok: true }));
  app.get('/slow', (_req, res) => {
    holds.push(() => res.json({ slow: true }));
  });
  app.get('/quick', (_req, res) => res.json({ quick: true }));
  app.get('/anything/watch', (_req, res) => {
    res.status(200).set({ 'Content-Type': 'text/event-stream; charset=utf-8' });
    res.flushHeaders();
    leaveRequestLine(res);
    res.write(': open\n\n');
  });
  server = app.listen(0, '127.0.0.1');
  await new Promise((r) => server!.once('listening', r));
  const base = `http://127.0.0.1:${(server!.address() as AddressInfo).port}`;
  return { base, finishSlow: () => holds.shift()?.() };
}

/** Resolves with the answer's status, or 'waiting' when none came within `ms`. */
async function within(ms: number, url: string): Promise<number | 'waiting'> {
  const ctrl = new AbortController();
  const timer = setTimeout(() => ctrl.abort(), ms);
  try {
    const res = await fetch(url, { signal: ctrl.signal });
    await res.text();
    return res.status;
  } catch {
    return 'waiting';
  } finally {
    clearTimeout(timer);
  }
}

describe('requestGate', () => {
  it('keeps a second request waiting while the one place is taken, but never health', async () => {
    const { base, finishSlow } = await gatedApp();
    const slow = fetch(`${base}/slow`);
    await new Promise((r) => setTimeout(r, 100));
    expect(await within(300, `${base}/quick`)).toBe('waiting');
    expect(await within(1000, `${base}/health`)).toBe(200);
    finishSlow();
    expect((await slow).status).toBe(200);
    expect(await within(1000, `${base}/quick`)).toBe(200);
  });

  it('lets an event stream give its place back once it starts', async () => {
    const { base } = await gatedApp();
    const ctrl = new AbortController();
    const stream = await fetch(`${base}/anything/watch`, { signal: ctrl.signal });
    expect(stream.headers.get('content-type')).toContain('text/event-stream');
    // The stream is still open, yet the next request is served.
    expect(await within(1000, `${base}/quick`)).toBe(200);
    ctrl.abort();
  });
});
