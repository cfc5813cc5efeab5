import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { EvaluationDto, EvaluationExistsBody, EvaluationPage, EvaluationSummaryDto } from '../../../shared/api/evaluations';
import type { CheckpointDto, RunDto } from '../../../shared/api/runs';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { createRun, ssmCheckpointBytes, ssmRunBody, uploadCorpus } from '../runs/runs-test-helpers';
import { ssmResultsFixture } from './evaluation-test-fixture';

let t: TestApp;
let f: BenchFixture;
let run: RunDto;
let coachRun: RunDto;
let checkpoint: CheckpointDto;
let coachCheckpoint: CheckpointDto;

const api = () => request(t.app);

async function uploadCheckpoint(r: RunDto, token: string, alphabet: string[]): Promise<CheckpointDto> {
  const res = await api().post(`/api/benches/${f.benchId}/runs/${r.id}/checkpoints?reason=manual`).set(bearer(token))
    .set('Content-Type', 'application/octet-stream').send(Buffer.from(ssmCheckpointBytes(alphabet, { step: 120 })));
  if (res.status !== 201) throw new Error(`checkpoint upload failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as CheckpointDto;
}

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  const corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Member SSM'));
  coachRun = await createRun(t, f.benchId, f.tokens.coach, ssmRunBody(corpus.id, 'Coach SSM'));
  checkpoint = await uploadCheckpoint(run, f.tokens.member, corpus.alphabet);
  coachCheckpoint = await uploadCheckpoint(coachRun, f.tokens.coach, corpus.alphabet);
});
afterAll(async () => t.close());

const evalUrl = (r: RunDto, c: CheckpointDto) => `/api/benches/${f.benchId}/runs/${r.id}/checkpoints/${c.id}/evaluations`;

describe('storing and reading evaluations', () => {
  let stored: EvaluationDto;

  it('stores the figures of a checkpoint and gives them back unchanged', async () => {
    const results = ssmResultsFixture();
    const res = await api().post(evalUrl(run, checkpoint)).set(bearer(f.tokens.member)).send({ settings: { K: 256, seed: 3 }, results });
    expect(res.status).toBe(201);
    stored = res.body as EvaluationDto;
    expect(stored.results).toEqual(results);
    // Defaults are filled in and stored with the settings.
    expect(stored.settings).toMatchObject({ K: 256, seed: 3, repeats: 3, S: 1024, M: 64, sampleCount: 1000, baselineRunId: null });
    expect(stored.checkpoint).toEqual({ id: checkpoint.id, step: 120 });
    expect(stored.headline).toEqual({ bitsPerChar: 2.3, bitsPerWord: 11.5, crossEntropyBits: 9.25 });

    const one = await api().get(`${evalUrl(run, checkpoint)}/${stored.id}`).set(bearer(f.tokens.viewer));
    expect(one.status).toBe(200);
    expect(one.body).toEqual(stored);
    const benchOne = await api().get(`/api/benches/${f.benchId}/evaluations/${stored.id}`).set(bearer(f.tokens.viewer));
    expect(benchOne.body).toEqual(stored);
  });

  it('lists evaluations under the checkpoint and bench-wide without the full figures', async () => {
    const list = await api().get(evalUrl(run, checkpoint)).set(bearer(f.tokens.viewer));
    expect(list.status).toBe(200);
    const items = list.body as EvaluationSummaryDto[];
    expect(items.map((e) => e.id)).toEqual([stored.id]);
    expect(items[0]).not.toHaveProperty('results');
    const page = (await api().get(`/api/benches/${f.benchId}/evaluations?runId=${run.id}`).set(bearer(f.tokens.viewer))).body as EvaluationPage;
    expect(page.total).toBe(1);
    expect(page.items[0]!.run).toEqual({ id: run.id, name: 'Member SSM', family: 'ssm' });
  });

  it('answers 409 with the stored evaluation when the same settings come again', async () => {
    const res = await api().post(evalUrl(run, checkpoint)).set(bearer(f.tokens.member))
      .send({ settings: { seed: 3, K: 256, repeats: 3 }, results: ssmResultsFixture() });
    expect(res.status).toBe(409);
    const body = res.body as EvaluationExistsBody;
    expect(body.error.code).toBe(ErrorCode.EvaluationExists);
    expect(body.error.existing.id).toBe(stored.id);
    expect(await countRows(t, 'evaluations')).toBe(1);
  });

  it('refuses figures that are not finite or of another family, and stores nothing', async () => {
    const broken = ssmResultsFixture() as { tight: { bitsPerChar: unknown } };
    broken.tight.bitsPerChar = null; // what JSON makes of NaN
    const a = await api().post(evalUrl(run, checkpoint)).set(bearer(f.tokens.member)).send({ settings: { K: 512 }, results: broken });
    expect(a.status).toBe(422);
    const gru = { family: 'gru', heldOut: { bitsPerWord: 1, bitsPerChar: 1, words: 1 }, crossEntropy: { crossEntropyBits: 1, dataEntropyBits: 1, klGapBits: 0, modelMass: 1 }, baselines: { unigram: { bitsPerWord: 1, bitsPerChar: 1, words: 1 } } };
    const b = await api().post(evalUrl(run, checkpoint)).set(bearer(f.tokens.member)).send({ settings: { K: 512 }, results: gru });
    expect(b.status).toBe(422);
    expect(b.body.error.fields['results.family']).toMatch(/ssm run/);
    const c = await api().post(evalUrl(run, checkpoint)).set(bearer(f.tokens.member)).send({ settings: { K: 0 }, results: ssmResultsFixture() });
    expect(c.status).toBe(422);
    expect(c.body.error.fields['settings.K']).toMatch(/at least 1/);
    expect(await countRows(t, 'evaluations')).toBe(1);
  });

  it('lets members evaluate only their own runs, coaches every run, viewers none', async () => {
    const results = ssmResultsFixture();
    const member = await api().post(evalUrl(coachRun, coachCheckpoint)).set(bearer(f.tokens.member)).send({ settings: { K: 256 }, results });
    expect(member.status).toBe(403);
    const viewer = await api().post(evalUrl(run, checkpoint)).set(bearer(f.tokens.viewer)).send({ settings: { K: 1024 }, results });
    expect(viewer.status).toBe(403);
    const coach = await api().post(evalUrl(run, checkpoint)).set(bearer(f.tokens.coach)).send({ settings: { K: 1024 }, results });
    expect(coach.status).toBe(201);
    expect(await countRows(t, 'evaluations')).toBe(2);
  });

  it('keeps an evaluation when its automatic checkpoint is pruned, and drops it with its run', async () => {
    const corpus = await uploadCorpus(t, f.benchId, f.tokens.member, undefined, 'Pruned words');
    const busy = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Often saved'));
    const upload = (step: number) => api().post(`/api/benches/${f.benchId}/runs/${busy.id}/checkpoints?reason=auto`).set(bearer(f.tokens.member))
      .set('Content-Type', 'application/octet-stream').send(Buffer.from(ssmCheckpointBytes(corpus.alphabet, { step })));
    const first = (await upload(10)).body as CheckpointDto;
    const stored = (await api().post(evalUrl(busy, first)).set(bearer(f.tokens.member)).send({ settings: { K: 64 }, results: ssmResultsFixture() })).body as EvaluationDto;
    // Ten newer automatic checkpoints push the first one out (AUTO_CHECKPOINTS_KEPT = 10).
    for (let step = 20; step <= 110; step += 10) { t.clock.advance(1000); expect((await upload(step)).status).toBe(201); }
    const left = (await api().get(`/api/benches/${f.benchId}/runs/${busy.id}/checkpoints`).set(bearer(f.tokens.viewer))).body as CheckpointDto[];
    expect(left.map((c) => c.id)).not.toContain(first.id);
    const kept = await api().get(`/api/benches/${f.benchId}/evaluations/${stored.id}`).set(bearer(f.tokens.viewer));
    expect(kept.status).toBe(200);
    expect((kept.body as EvaluationDto).checkpoint).toEqual({ id: '', step: 10 });
    await api().post(`/api/benches/${f.benchId}/runs/${busy.id}/archive`).set(bearer(f.tokens.member)).send({}).expect(409); // still queued
    await api().patch(`/api/benches/${f.benchId}/runs/${busy.id}`).set(bearer(f.tokens.member)).send({ status: 'stopped' }).expect(200);
    await api().delete(`/api/benches/${f.benchId}/runs/${busy.id}`).set(bearer(f.tokens.member)).expect(204);
    expect((await api().get(`/api/benches/${f.benchId}/evaluations/${stored.id}`).set(bearer(f.tokens.viewer))).status).toBe(404);
  });

  it('answers 404 for a checkpoint of another run', async () => {
    const res = await api().get(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints/${coachCheckpoint.id}/evaluations`).set(bearer(f.tokens.viewer));
    expect(res.status).toBe(404);
  });
});
