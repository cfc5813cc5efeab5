/**
 * Helpers for the runs specs: a corpus saved through the corpora API, runs created through the runs API,
 * and real checkpoint files written with the model core's `encodeCheckpoint` from hand-made weights
 * whose shapes come from the model core's parameter tables.
 */
import request from 'supertest';
import type { CreateRunRequest, RunDto } from '../../../shared/api/runs';
import { encodeCheckpoint, type ModelFamily } from '../../../shared/model/checkpoint';
import { gruSpecs } from '../../../shared/model/gru-lm';
import type { NamedWeights, ParamSpecs } from '../../../shared/model/params';
import { ssmParamSpecs, type SsmSettings } from '../../../shared/model/ssm-settings';
import { bearer, type TestApp } from '../../testing/test-app';

/** An invented word list over the letters a, b, c (word \t count). */
export const TINY_TSV = 'word\tcount\nabba\t5\nbaba\t3\ncab\t2\nabc\t2\ncabba\t1\nbac\t1\naa\t4\nbb\t1\ncc\t1\nacab\t2\n';

export async function uploadCorpus(t: TestApp, benchId: string, token: string, tsv = TINY_TSV, name = 'Tiny words'): Promise<{ id: string; alphabet: string[] }> {
  const res = await request(t.app)
    .post(`/api/benches/${benchId}/corpora`)
    .set(bearer(token))
    .attach('file', Buffer.from(tsv, 'utf8'), 'tiny.tsv')
    .field('name', name);
  if (res.status !== 201) throw new Error(`corpus upload failed: ${res.status} ${JSON.stringify(res.body)}`);
  const body = res.body as { id: string; alphabet: string[] };
  return { id: body.id, alphabet: body.alphabet };
}

export const tinySsmModel = {
  stateSize: 2,
  generativeFlow: [{ kind: 'diag' as const }],
  inferenceFlow: [{ kind: 'shift' as const }],
  flowHidden: 3,
  observationHidden: 0,
  embeddingSize: 2,
  encoderSize: 3,
  proposalHidden: 3,
};

export const tinyTraining = { steps: 200, batchSize: 8, samples: 4, learningRate: 0.01, clipNorm: 5, warmupSteps: 0, regime: 'token' as const, seed: 7 };

export function ssmRunBody(corpusId: string, name = 'Tiny SSM'): CreateRunRequest {
  return { family: 'ssm', name, corpusId, settings: { model: { ...tinySsmModel }, training: { ...tinyTraining } } };
}

export async function createRun(t: TestApp, benchId: string, token: string, body: CreateRunRequest): Promise<RunDto> {
  const res = await request(t.app).post(`/api/benches/${benchId}/runs`).set(bearer(token)).send(body);
  if (res.status !== 201) throw new Error(`run creation failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as RunDto;
}

/** Deterministic, varied float values (including -0 and a subnormal) for every tensor of a spec table. */
export function handMadeWeights(specs: ParamSpecs): NamedWeights {
  const weights: NamedWeights = {};
  let k = 0;
  for (const name of Object.keys(specs).sort()) {
    const shape = specs[name]!.shape;
    const values = new Float32Array(shape.reduce((a, b) => a * b, 1));
    for (let i = 0; i < values.length; i++, k++) values[i] = k === 0 ? -0 : k === 1 ? 1e-40 : Math.sin(k * 1.7) * (1 + (k % 5));
    weights[name] = { shape: shape.slice(), values };
  }
  return weights;
}

export function ssmSettingsFor(alphabet: string[], model = tinySsmModel): SsmSettings {
  return { ...model, vocabSize: alphabet.length + 1 };
}

export function ssmCheckpointBytes(alphabet: string[], opts: { model?: typeof tinySsmModel; step?: number; family?: ModelFamily } = {}): Uint8Array {
  const settings = ssmSettingsFor(alphabet, opts.model);
  return encodeCheckpoint({
    family: opts.family ?? 'ssm',
    settings,
    alphabet,
    step: opts.step ?? 120,
    seed: 7,
    weights: handMadeWeights(ssmParamSpecs(settings)),
    createdAt: '2026-03-01T09:00:00.000Z',
  });
}

export function gruCheckpointBytes(alphabet: string[], step = 40): Uint8Array {
  const settings = { vocabSize: alphabet.length + 1, stateSize: 2, embeddingSize: 2, observationHidden: 0 };
  return encodeCheckpoint({ family: 'gru', settings, alphabet, step, seed: 3, weights: handMadeWeights(gruSpecs(settings)), createdAt: '2026-03-01T09:00:00.000Z' });
}

/** A checkpoint file with exactly the given settings and weights (to build inconsistent ones on purpose). */
export function checkpointBytesWith(family: ModelFamily, settings: unknown, alphabet: string[], weights: NamedWeights): Uint8Array {
  return encodeCheckpoint({ family, settings, alphabet, step: 5, seed: 1, weights, createdAt: '2026-03-01T09:00:00.000Z' });
}

/** A supertest body parser that collects a binary answer into a Buffer. */
export function binaryBody(res: NodeJS.EventEmitter, done: (err: Error | null, body: Buffer) => void): void {
  const chunks: Buffer[] = [];
  res.on('data', (chunk: Buffer) => chunks.push(chunk));
  res.on('end', () => done(null, Buffer.concat(chunks)));
}

export async function setStatusDirectly(t: TestApp, runId: string, status: string): Promise<void> {
  await t.orm.em.fork().getConnection().execute('update runs set status = ?, archived = 0 where id = ?', [status, runId]);
}
