/**
 * The hand-written gradient of the log-weight (the inference recurrence in `ssm-recurrence.ts` with the flow
 * layers' backward passes in `flows/forward-grads.ts`) against TF.js's automatic differentiation of the
 * step-by-step code it replaced (`testing/log-weights-by-autodiff.ts`): same log-weights and the same gradient
 * for every weight, on small models with random weights, every flow kind on both sides, padded words, K > 1 and
 * a warm-up weight. Tolerance: relative 1e-5 of each tensor's largest entry (float32 sums taken in another order
 * differ in the last digits; common practice, no source).
 */
import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet, encodeBatch } from '../data/encode';
import { createRng } from '../data/random';
import { initNodeBackend } from '../node/tf-node';
import type { FlowSpec } from './flows/flow';
import { StateSpaceModel } from './ssm';
import { computeLogWeights } from './ssm-log-weights';
import { defaultSsmSettings } from './ssm-settings';
import { maxAbs, maxDiff } from './testing/array-diff';
import { computeLogWeightsByAutodiff } from './testing/log-weights-by-autodiff';

beforeAll(async () => {
  await initNodeBackend('wasm');
});

const words = ['mira', 'tobin', 'al', 'sefa', 'o', 'kettleby'];
const alphabet = buildAlphabet(words);
const batch = encodeBatch(words, alphabet);
const K = 3;

const flows = (...kinds: FlowSpec['kind'][]): FlowSpec[] => kinds.map((kind) => ({ kind }));

/** A model whose every weight is drawn at random (biases and scales too, so no term starts at a special value). */
function randomModel(stateSize: number, inferenceFlow: FlowSpec[], generativeFlow: FlowSpec[], observationHidden = 0): StateSpaceModel {
  const settings = defaultSsmSettings(alphabet.size, {
    stateSize, inferenceFlow, generativeFlow, observationHidden, flowHidden: 5, embeddingSize: 3, encoderSize: 6, proposalHidden: 7,
  });
  const model = new StateSpaceModel(settings, 'recurrence');
  const rng = createRng(`weights/${JSON.stringify([stateSize, inferenceFlow, generativeFlow])}`);
  const weights = model.getWeights();
  for (const w of Object.values(weights)) for (let i = 0; i < w.values.length; i++) w.values[i] = 0.3 * rng.normal();
  model.setWeights(weights);
  return model;
}

type Compute = typeof computeLogWeights;

/** log W and the gradient of sum(R * log W) (R fixed random weights per entry) for every variable. */
function valueAndGrads(model: StateSpaceModel, compute: Compute, beta: number): { logW: Float32Array; grads: Float32Array[] } {
  return tf.tidy(() => {
    const r = tf.tensor2d(Array.from({ length: batch.batchSize * K }, (_, i) => Math.cos(1.7 * i)), [batch.batchSize, K]);
    let logW: Float32Array | null = null;
    const { grads } = tf.variableGrads(() => {
      const lw = compute(model, batch, K, 4242, beta, false).logW;
      logW = lw.dataSync() as Float32Array;
      return tf.sum(tf.mul(lw, r)) as tf.Scalar;
    }, model.variables);
    return { logW: logW as unknown as Float32Array, grads: model.variables.map((v) => (grads[v.name] as tf.Tensor).dataSync() as Float32Array) };
  });
}

function expectSame(model: StateSpaceModel, beta = 1): void {
  const fast = valueAndGrads(model, computeLogWeights, beta);
  const ref = valueAndGrads(model, computeLogWeightsByAutodiff, beta);
  expect(fast.logW.length).toBe(batch.batchSize * K);
  expect(maxDiff(fast.logW, ref.logW)).toBeLessThanOrEqual(1e-5 * maxAbs(ref.logW));
  model.variableNames.forEach((name, i) => {
    const [a, b] = [fast.grads[i] as Float32Array, ref.grads[i] as Float32Array];
    expect(a.length, name).toBe(b.length);
    expect(maxDiff(a, b), name).toBeLessThanOrEqual(1e-5 * maxAbs(b) + 1e-7);
  });
  // Every weight gets a gradient that is not zero (the check above is not passed by two zero tensors).
  ref.grads.forEach((g, i) => expect(maxAbs(g), model.variableNames[i]).toBeGreaterThan(0));
}

describe('hand-written gradient of the log-weight', () => {
  const cases: Array<[string, number, FlowSpec[], FlowSpec[]]> = [
    ['diag / coupling + coupling + diag (the reference case)', 4, flows('diag'), flows('coupling', 'coupling', 'diag')],
    ['shift / tril', 4, flows('shift'), flows('tril')],
    ['tril / shift + diag', 4, flows('tril'), flows('shift', 'diag')],
    ['coupling + coupling / diag', 4, flows('coupling', 'coupling'), flows('diag')],
    ['coupling + tril + shift + diag / coupling', 5, flows('coupling', 'tril', 'shift', 'diag'), flows('coupling')],
    ['state size 1: tril + coupling / tril', 1, flows('tril', 'coupling'), flows('tril')],
  ];
  for (const [label, d, inf, gen] of cases) {
    it(`matches automatic differentiation: ${label}`, () => {
      const model = randomModel(d, inf, gen);
      expectSame(model);
      model.dispose();
    });
  }

  it('matches with a warm-up weight and an observation MLP', () => {
    const model = randomModel(3, flows('coupling', 'diag'), flows('diag', 'coupling'), 4);
    expectSame(model, 0.35);
    model.dispose();
  });

  it('leaves no tensors behind', () => {
    const model = randomModel(4, flows('coupling', 'tril'), flows('diag'));
    valueAndGrads(model, computeLogWeights, 1);
    const before = tf.memory().numTensors;
    valueAndGrads(model, computeLogWeights, 1);
    expect(tf.memory().numTensors).toBe(before);
    model.dispose();
  });
});
