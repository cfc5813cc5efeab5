/**
 * Pins the reference training step (state 8, K 8, batch 64; generative flow 2 coupling + diag; inference flow
 * diag; inference GRU 64 — the reference case of `npm run bench`) on fixed seeds: loss, gradient norm, and the
 * losses after Adam updates. Any change to the speed of the step must leave these figures in place.
 *
 * The pinned numbers were computed by the implementation before the speed work (commit 06123a6); an independent
 * twin of the step in PyTorch checks the same loss in `npm run bench:twin`. Tolerance: relative 1e-5 (float32
 * sums taken in a different order differ in the last digits; common practice, no source).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { createBatcher } from '../data/batcher';
import { parseCorpus } from '../data/corpus-parse';
import { buildAlphabet, encodeBatch } from '../data/encode';
import { createRng } from '../data/random';
import { initNodeBackend } from '../node/tf-node';
import { iwaeBound } from './bounds';
import { StateSpaceModel } from './ssm';
import { defaultSsmSettings } from './ssm-settings';
import { globalNorm, SsmTrainer } from './trainer';

beforeAll(async () => {
  await initNodeBackend('wasm');
});

/** Values printed by the code of commit 06123a6 (see the file comment). */
const PINNED = {
  loss: 46.760643005371094,
  gradNorm: 48.117923736572266,
  /** Losses of trainer steps 1..3 (steps 2 and 3 see the weights after one and two Adam updates). */
  stepLosses: [48.51971435546875, 39.053958892822266, 34.67876052856445],
  /** Loss of the first batch again after the three updates. */
  lossAfter: 29.703571319580078,
};

function referenceSetup() {
  const file = join(process.cwd(), 'datasets-demo', 'archipelago-places.tsv');
  const parsed = parseCorpus(new Uint8Array(readFileSync(file)), { fileName: 'archipelago-places.tsv' });
  if (!parsed.ok) throw new Error('The demo corpus did not parse.');
  const alphabet = buildAlphabet(parsed.words.map((w) => w.word));
  const batcher = createBatcher(parsed.words, { batchSize: 64, regime: 'token', rng: createRng('step-pin') });
  const batches = [0, 1, 2].map(() => encodeBatch(batcher.next(), alphabet));
  const model = new StateSpaceModel(
    defaultSsmSettings(alphabet.size, {
      stateSize: 8,
      generativeFlow: [{ kind: 'coupling' }, { kind: 'coupling' }, { kind: 'diag' }],
      inferenceFlow: [{ kind: 'diag' }],
      encoderSize: 64,
    }),
    1,
  );
  return { model, batches };
}

/** Loss and global gradient norm of one batch on fixed noise, without changing the weights. */
function lossAndNorm(model: StateSpaceModel, batch: ReturnType<typeof encodeBatch>, seed: number): [number, number] {
  return tf.tidy(() => {
    const { value, grads } = tf.variableGrads(
      () => tf.neg(tf.mean(iwaeBound(model.logWeights(batch, 8, { seed }).logW))) as tf.Scalar,
      model.variables,
    );
    const norm = globalNorm(model.variables.map((v) => grads[v.name] as tf.Tensor));
    return [value.dataSync()[0] as number, norm.dataSync()[0] as number];
  });
}

const close = (actual: number, expected: number) => expect(Math.abs(actual - expected)).toBeLessThanOrEqual(1e-5 * Math.abs(expected));

describe('reference training step (pinned)', () => {
  it('has the pinned loss, gradient norm and post-Adam losses', () => {
    expect(tf.getBackend()).toBe('wasm');
    const { model, batches } = referenceSetup();
    expect(model.parameterCount).toBe(22933);
    const [loss, gradNorm] = lossAndNorm(model, batches[0]!, 12345);
    const trainer = new SsmTrainer(model, { learningRate: 0.01, samples: 8, clipNorm: 5 });
    const stepLosses = batches.map((b) => trainer.step(b).loss);
    const [lossAfter] = lossAndNorm(model, batches[0]!, 12345);
    close(loss, PINNED.loss);
    close(gradNorm, PINNED.gradNorm);
    stepLosses.forEach((l, i) => close(l, PINNED.stepLosses[i]!));
    close(lossAfter, PINNED.lossAfter);
    trainer.dispose();
    model.dispose();
  });
});
