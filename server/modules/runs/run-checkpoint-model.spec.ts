/**
 * Cross-boundary: a checkpoint written from a real (untrained, seeded) state-space model and its trainer
 * goes through the server and comes back as a model with the same weights and optimiser state.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CheckpointDto } from '../../../shared/api/runs';
import { decodeCheckpoint, encodeCheckpoint } from '../../../shared/model/checkpoint';
import { StateSpaceModel } from '../../../shared/model/ssm';
import { modelFromCheckpoint, ssmCheckpoint } from '../../../shared/model/ssm-checkpoint';
import { SsmTrainer } from '../../../shared/model/trainer';
import { initNodeBackend } from '../../../shared/node/tf-node';
import { bearer, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { binaryBody, createRun, ssmRunBody, ssmSettingsFor, uploadCorpus } from './runs-test-helpers';

let t: TestApp;
let f: BenchFixture;

beforeAll(async () => {
  await initNodeBackend('cpu');
  t = await createTestApp();
  f = await createBenchFixture(t);
});
afterAll(async () => t.close());

describe('a real model checkpoint through the server', () => {
  it('uploads, downloads and restores the same weights and optimiser state', async () => {
    const corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
    const run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Real model'));
    const model = new StateSpaceModel(ssmSettingsFor(corpus.alphabet), 11);
    const trainer = new SsmTrainer(model, { learningRate: 0.01, samples: 2, clipNorm: 5 });
    const bytes = encodeCheckpoint(ssmCheckpoint(model, { alphabet: corpus.alphabet, seed: 11, trainer }));
    const original = model.getWeights();
    const optimizer = trainer.getOptimizerState();
    trainer.dispose();
    model.dispose();

    const url = `/api/benches/${f.benchId}/runs/${run.id}/checkpoints`;
    const res = await request(t.app).post(`${url}?reason=stop`).set(bearer(f.tokens.member)).set('Content-Type', 'application/octet-stream').send(Buffer.from(bytes));
    expect(res.status).toBe(201);
    const saved = res.body as CheckpointDto;
    const file = await request(t.app).get(`${url}/${saved.id}/file`).set(bearer(f.tokens.viewer)).buffer(true).parse(binaryBody);
    const back = decodeCheckpoint(new Uint8Array(file.body as Buffer));
    const restored = modelFromCheckpoint(back);
    try {
      const weights = restored.getWeights();
      expect(Object.keys(weights).sort()).toEqual(Object.keys(original).sort());
      for (const [name, w] of Object.entries(original)) {
        expect(weights[name]!.shape).toEqual(w.shape);
        expect(Buffer.compare(Buffer.from(weights[name]!.values.buffer), Buffer.from(w.values.buffer))).toBe(0);
      }
      expect(Object.keys(back.optimizer ?? {}).sort()).toEqual(Object.keys(optimizer).sort());
    } finally {
      restored.dispose();
    }
  });
});
