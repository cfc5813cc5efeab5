/**
 * The worker sends checkpoints to the server itself (`TrainerApi.uploadCheckpoint`), so the page's main thread
 * does no work for a save. Here the real `TrainerSession`, driven over a comlink MessageChannel as the page
 * drives the worker, uploads to the real Express app listening on a local port: a good save is stored and
 * listed; a refused one (no sign-in, a run whose model does not match) fails with the server's sentence and
 * stores nothing.
 */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { expose, wrap, type Remote } from 'comlink';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CheckpointDto, RunDto, TrainingSet as CorpusTrainingSet } from '../../shared/api/runs';
import { initNodeBackend } from '../../shared/node/tf-node';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../server/testing/test-app';
import { createRun, ssmRunBody, tinySsmModel, uploadCorpus } from '../../server/modules/runs/runs-test-helpers';
import { trainerSettingsOf, trainingSetOf } from '../../src/app/runs/run-trainer-settings';
import type { TrainerApi } from '../../src/app/workers/trainer-api';
import { fromBoundaryError } from '../../src/app/workers/trainer-client';
import { TrainerSession } from '../../src/app/workers/trainer-session';

let t: TestApp;
let f: BenchFixture;
let server: Server;
let origin = '';
let run: RunDto;
let other: RunDto;
let api: Remote<TrainerApi>;
const ports: MessagePort[] = [];

const uploadUrl = (r: RunDto, query = 'reason=manual') => `${origin}/api/benches/${f.benchId}/runs/${r.id}/checkpoints?${query}`;

beforeAll(async () => {
  const backend = await initNodeBackend('wasm');
  t = await createTestApp();
  f = await createBenchFixture(t);
  server = t.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Saved from the worker'));
  // Same corpus, a different model: a checkpoint of `run` does not fit it.
  const wider = ssmRunBody(corpus.id, 'Wider state');
  (wider.settings as { model: typeof tinySsmModel }).model = { ...tinySsmModel, stateSize: 3 };
  other = await createRun(t, f.benchId, f.tokens.member, wider);
  const set = (await request(t.app).get(`/api/benches/${f.benchId}/corpora/${corpus.id}/training-set`).set(bearer(f.tokens.member))).body as CorpusTrainingSet;
  const channel = new MessageChannel();
  ports.push(channel.port1, channel.port2);
  expose(new TrainerSession(async () => ({ backend, simd: false, threads: 1 })), channel.port1);
  api = wrap<TrainerApi>(channel.port2);
  await api.init(trainerSettingsOf(run), trainingSetOf(run, set));
});

afterAll(async () => {
  await api?.dispose();
  for (const p of ports) p.close();
  await new Promise<void>((resolve) => server?.close(() => resolve()));
  await t?.close();
});

describe('uploadCheckpoint from the worker', () => {
  it('stores the checkpoint on the server and answers with its description', async () => {
    const answer = await api.uploadCheckpoint({ url: uploadUrl(run, 'reason=manual&boundBitsPerChar=3.25'), token: f.tokens.member });
    expect(answer).toMatchObject({ step: 0, reason: 'manual', boundBitsPerChar: 3.25 });
    const list = (await request(t.app).get(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints`).set(bearer(f.tokens.viewer))).body as CheckpointDto[];
    expect(list.map((c) => c.id)).toContain(answer.id);
  });

  it('fails with a sentence and stores nothing without a sign-in', async () => {
    const before = await countRows(t, 'checkpoints');
    const error = await api.uploadCheckpoint({ url: uploadUrl(run), token: null }).then(() => null, (e: unknown) => fromBoundaryError(e));
    expect(error?.code).toBe('UPLOAD_FAILED');
    expect(error?.message).toMatch(/^The server did not store the checkpoint: .*sign/i);
    expect(await countRows(t, 'checkpoints')).toBe(before);
  });

  it('relays the server refusal when the checkpoint does not fit the run, and stores nothing', async () => {
    const before = await countRows(t, 'checkpoints');
    const error = await api.uploadCheckpoint({ url: uploadUrl(other), token: f.tokens.member }).then(() => null, (e: unknown) => fromBoundaryError(e));
    expect(error?.code).toBe('UPLOAD_FAILED');
    expect(error?.message).toMatch(/^The server did not store the checkpoint: /);
    expect(await countRows(t, 'checkpoints')).toBe(before);
  });

  it('says the server could not be reached when nothing listens', async () => {
    const error = await api.uploadCheckpoint({ url: 'http://127.0.0.1:9/api/nowhere', token: null }).then(() => null, (e: unknown) => fromBoundaryError(e));
    expect(error?.code).toBe('UPLOAD_FAILED');
    expect(error?.message).toMatch(/could not reach the server/);
  });
});
