/**
 * Server-sent events over a real loopback socket: a PATCH from a tab and a runner's progress reach the run's
 * stream and the bench's stream; a closed stream leaves no listener behind.
 */
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { createRun, ssmRunBody, uploadCorpus } from '../runs/runs-test-helpers';
import { createRunnerRun, createRunnerToken, progressAt, runnerCall } from './runners-test-helpers';

let t: TestApp;
let f: BenchFixture;
let server: Server;
let base: string;
let corpus: { id: string; alphabet: string[] };

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  server = t.app.listen(0, '127.0.0.1');
  await new Promise<void>((done) => server.once('listening', () => done()));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(async () => {
  server.closeAllConnections();
  await new Promise<void>((done) => server.close(() => done()));
  await t.close();
});

interface SseEvent {
  event: string;
  data: unknown;
}

/** Opens a stream and returns a reader that waits for the first event matching a test. */
async function openStream(path: string, token: string) {
  const abort = new AbortController();
  const res = await fetch(`${base}${path}`, { headers: { Authorization: `Bearer ${token}` }, signal: abort.signal });
  const reader = res.body!.getReader();
  const decoder = new TextDecoder();
  let buffer = '';
  const seen: SseEvent[] = [];
  // One read in flight at a time: a read that outlives a wait is picked up by the next wait, not lost.
  let pending: Promise<ReadableStreamReadResult<Uint8Array>> | null = null;
  async function next(test: (e: SseEvent) => boolean, timeoutMs = 5000): Promise<SseEvent> {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      const found = seen.find(test);
      if (found) return found;
      if (Date.now() > deadline) throw new Error(`no matching event within ${timeoutMs} ms; got ${JSON.stringify(seen)}`);
      pending ??= reader.read();
      const chunk = await Promise.race([pending, new Promise<null>((done) => setTimeout(() => done(null), 200))]);
      if (chunk === null) continue;
      pending = null;
      if (chunk.done) throw new Error('stream ended');
      buffer += decoder.decode(chunk.value, { stream: true });
      let cut: number;
      while ((cut = buffer.indexOf('\n\n')) >= 0) {
        const block = buffer.slice(0, cut);
        buffer = buffer.slice(cut + 2);
        const event = /^event: (.*)$/m.exec(block)?.[1];
        const data = /^data: (.*)$/m.exec(block)?.[1];
        if (event && data) seen.push({ event, data: JSON.parse(data) });
      }
    }
  }
  return { res, next, close: () => abort.abort() };
}

async function waitForNoListeners(benchId: string): Promise<number> {
  for (let i = 0; i < 50 && t.runEvents.listenerCount(benchId) > 0; i++) await new Promise((done) => setTimeout(done, 20));
  return t.runEvents.listenerCount(benchId);
}

describe('server-sent events', () => {
  it('delivers a run event after a PATCH, with canControl for the watcher, and cleans up on disconnect', async () => {
    const run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Watched'));
    const viewer = await openStream(`/api/benches/${f.benchId}/runs/${run.id}/events`, f.tokens.viewer);
    expect(viewer.res.status).toBe(200);
    expect(viewer.res.headers.get('content-type')).toMatch(/^text\/event-stream/);
    const first = await viewer.next((e) => e.event === 'run');
    expect(first.data).toMatchObject({ id: run.id, status: 'queued', canControl: false });
    const creator = await openStream(`/api/benches/${f.benchId}/events`, f.tokens.member);
    expect(t.runEvents.listenerCount(f.benchId)).toBe(2);

    const patch = await request(t.app).patch(`/api/benches/${f.benchId}/runs/${run.id}`).set(bearer(f.tokens.member)).send({ status: 'training', stepsDone: 12 });
    expect(patch.status).toBe(200);
    const seenByViewer = await viewer.next((e) => e.event === 'run' && (e.data as { status: string }).status === 'training');
    expect(seenByViewer.data).toMatchObject({ stepsDone: 12, canControl: false });
    const seenByCreator = await creator.next((e) => e.event === 'run' && (e.data as { status: string }).status === 'training');
    expect(seenByCreator.data).toMatchObject({ id: run.id, canControl: true });

    await request(t.app).post(`/api/benches/${f.benchId}/runs/${run.id}/metrics`).set(bearer(f.tokens.member)).send({ points: [{ series: 'train_bound', step: 12, value: 2.5 }] });
    const metrics = await viewer.next((e) => e.event === 'metrics');
    expect(metrics.data).toEqual({ points: [{ series: 'train_bound', step: 12, value: 2.5 }] });

    viewer.close();
    creator.close();
    expect(await waitForNoListeners(f.benchId)).toBe(0);
  });

  it("carries a runner's progress to the run's stream", async () => {
    const token = (await createRunnerToken(t, f.tokens.admin)).token;
    const run = await createRunnerRun(t, f.benchId, f.tokens.member, corpus.id, 'Far away');
    const stream = await openStream(`/api/benches/${f.benchId}/runs/${run.id}/events`, f.tokens.viewer);
    const runner = runnerCall(t, token);
    await runner.claim();
    await runner.progress(run.id, progressAt(30));
    const progress = await stream.next((e) => e.event === 'progress');
    expect(progress.data).toMatchObject({ step: 30, steps: 200, stepsPerSecond: 4, etaSeconds: 42.5, runnerName: 'Cellar box' });
    const asRun = await stream.next((e) => e.event === 'run' && (e.data as { stepsDone: number }).stepsDone === 30);
    expect(asRun.data).toMatchObject({ status: 'training', placement: 'runners', runner: { name: 'Cellar box' }, corpus: { id: corpus.id, name: 'Tiny words' } });
    // The creator's name, although the runner routes do not load the creator.
    expect((asRun.data as { createdBy: { displayName: unknown } }).createdBy.displayName).toEqual(expect.stringMatching(/\S/));
    stream.close();
    expect(await waitForNoListeners(f.benchId)).toBe(0);
  });

  it('tells the bench stream and the run stream when a run is deleted', async () => {
    const run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Soon gone'));
    const other = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Stays'));
    const runStream = await openStream(`/api/benches/${f.benchId}/runs/${run.id}/events`, f.tokens.viewer);
    const otherStream = await openStream(`/api/benches/${f.benchId}/runs/${other.id}/events`, f.tokens.viewer);
    const benchStream = await openStream(`/api/benches/${f.benchId}/events`, f.tokens.viewer);
    await runStream.next((e) => e.event === 'run');
    await otherStream.next((e) => e.event === 'run');
    // A queued tab run cannot be deleted: stop it first.
    expect((await request(t.app).patch(`/api/benches/${f.benchId}/runs/${run.id}`).set(bearer(f.tokens.member)).send({ status: 'stopped' })).status).toBe(200);
    const gone = await request(t.app).delete(`/api/benches/${f.benchId}/runs/${run.id}`).set(bearer(f.tokens.member));
    expect(gone.status).toBe(204);

    const expected = { id: run.id, benchId: f.benchId, name: 'Soon gone', deletedBy: expect.stringMatching(/\S/) };
    expect((await runStream.next((e) => e.event === 'deleted')).data).toEqual(expected);
    expect((await benchStream.next((e) => e.event === 'deleted')).data).toEqual(expected);
    // Another run's stream is not told.
    await expect(otherStream.next((e) => e.event === 'deleted', 600)).rejects.toThrow(/no matching event/);
    for (const s of [runStream, otherStream, benchStream]) s.close();
    expect(await waitForNoListeners(f.benchId)).toBe(0);
  });

  it('refuses a stream to non-members (404) and to callers without a token (401)', async () => {
    const outsider = await fetch(`${base}/api/benches/${f.benchId}/events`, { headers: { Authorization: `Bearer ${f.tokens.outsider}` } });
    expect(outsider.status).toBe(404);
    const anonymous = await fetch(`${base}/api/benches/${f.benchId}/events`);
    expect(anonymous.status).toBe(401);
    expect(t.runEvents.listenerCount(f.benchId)).toBe(0);
  });
});
