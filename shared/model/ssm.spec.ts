import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet, encodeBatch, type EncodedBatch } from '../data/encode';
import { initNodeBackend } from '../node/tf-node';
import { WeightShapeError } from './params';
import { StateSpaceModel } from './ssm';
import { defaultSsmSettings, ssmParameterCount, validateSsmSettings, type SsmSettings } from './ssm-settings';

beforeAll(async () => {
  await initNodeBackend();
});

const words = ['mira', 'tobin', 'al', 'sefa'];
const alphabet = buildAlphabet(words);
const small = (over: Partial<SsmSettings> = {}): SsmSettings =>
  defaultSsmSettings(alphabet.size, {
    stateSize: 3,
    flowHidden: 4,
    embeddingSize: 5,
    encoderSize: 6,
    proposalHidden: 7,
    ...over,
  });

/** The same word padded to a longer maxLen by hand (ids 0 = EOW, mask 0). */
function padded(batch: EncodedBatch, maxLen: number): EncodedBatch {
  const ids = new Int32Array(batch.batchSize * maxLen);
  const mask = new Float32Array(batch.batchSize * maxLen);
  for (let b = 0; b < batch.batchSize; b++) {
    ids.set(batch.ids.subarray(b * batch.maxLen, (b + 1) * batch.maxLen), b * maxLen);
    mask.set(batch.mask.subarray(b * batch.maxLen, (b + 1) * batch.maxLen), b * maxLen);
  }
  return { ...batch, ids, mask, maxLen };
}

describe('StateSpaceModel', () => {
  it('counts parameters by the architecture formula of MODEL.md sections 2–4', () => {
    const s = small();
    const [d, V, E, H, P, F] = [s.stateSize, s.vocabSize, s.embeddingSize, s.encoderSize, s.proposalHidden, s.flowHidden];
    // Closed form for linear observation and diagonal flows (no source beyond the layer definitions):
    const diagFlow = d * F + F + F * 2 * d + 2 * d;
    const expected =
      d + // h_0
      d * V + V + // observation
      V * E + // embedding
      E * 3 * H + 3 * H + H * 3 * H + 3 * H + // GRU with fused gates
      d * P + H * P + P + P * 2 * d + 2 * d + // proposal MLP on [h, b]
      2 * diagFlow;
    const model = new StateSpaceModel(s, 1);
    expect(model.parameterCount).toBe(expected);
    expect(ssmParameterCount(s)).toBe(expected);
    const fromWeights = Object.values(model.getWeights()).reduce((n, w) => n + w.values.length, 0);
    expect(fromWeights).toBe(expected);
    model.dispose();
  });

  it('initialises from the seed: same seed, same weights; another seed, other weights', () => {
    const a = new StateSpaceModel(small(), 'seed-a');
    const b = new StateSpaceModel(small(), 'seed-a');
    const c = new StateSpaceModel(small(), 'seed-b');
    const wa = a.getWeights();
    expect(b.getWeights()).toEqual(wa);
    expect(c.getWeights()['obs.w']?.values).not.toEqual(wa['obs.w']?.values);
    // Glorot-uniform bound sqrt(6 / (fanIn + fanOut)) (Glorot & Bengio 2010).
    const limit = Math.sqrt(6 / (3 + alphabet.size));
    const obs = Array.from(wa['obs.w']?.values ?? []);
    expect(Math.max(...obs.map(Math.abs))).toBeLessThanOrEqual(limit);
    expect(Math.max(...obs.map(Math.abs))).toBeGreaterThan(limit / 3);
    [a, b, c].forEach((m) => m.dispose());
  });

  it('returns log-weights [B, K], states [K, B, T, d] and prior samples [n, T, d] without leaking tensors', () => {
    for (const flow of [[{ kind: 'tril' }], [{ kind: 'coupling' }, { kind: 'coupling' }, { kind: 'diag' }]] as SsmSettings['generativeFlow'][]) {
      const model = new StateSpaceModel(small({ generativeFlow: flow, inferenceFlow: flow, observationHidden: 5 }), 2);
      const batch = encodeBatch(words, alphabet);
      const before = tf.memory().numTensors;
      const r = model.logWeights(batch, 3, { returnStates: true });
      expect(r.logW.shape).toEqual([4, 3]);
      expect(r.states?.shape).toEqual([3, 4, batch.maxLen, 3]);
      const lw = r.logW.arraySync().flat();
      expect(lw.every((v) => Number.isFinite(v) && v < 0)).toBe(true);
      tf.dispose([r.logW, r.states as tf.Tensor]);
      const prior = model.samplePrior(5, 7, 11);
      expect(prior.shape).toEqual([5, 7, 3]);
      prior.dispose();
      const z = tf.zeros([2, 3]) as tf.Tensor2D;
      const lp = model.observationLogProbs(z);
      // log-softmax rows sum to 1 in probability (closed form).
      expect(tf.tidy(() => tf.sum(tf.exp(lp), 1).arraySync())).toEqual([expect.closeTo(1, 5), expect.closeTo(1, 5)]);
      tf.dispose([lp, z]);
      expect(tf.memory().numTensors).toBe(before);
      model.dispose();
    }
  });

  it('padding beyond a word contributes nothing to its log-weight', () => {
    const model = new StateSpaceModel(small(), 3);
    const batch = encodeBatch(['al', 'mira'], alphabet);
    const longer = padded(batch, batch.maxLen + 4);
    const a = tf.tidy(() => model.logWeights(batch, 4, { seed: 5 }).logW.arraySync());
    const b = tf.tidy(() => model.logWeights(longer, 4, { seed: 5 }).logW.arraySync());
    // The noise of the first maxLen steps is the same prefix of one seeded stream in both calls.
    a.flat().forEach((v, i) => expect(b.flat()[i]).toBeCloseTo(v, 4));
    // ... and the mask really matters: unmasking the padding changes the value.
    const unmasked = { ...longer, mask: longer.mask.map(() => 1) };
    const c = tf.tidy(() => model.logWeights(unmasked, 4, { seed: 5 }).logW.arraySync());
    expect(Math.abs((c[0]?.[0] as number) - (a[0]?.[0] as number))).toBeGreaterThan(1e-2);
    model.dispose();
  });

  it('transition and transitionInverse are inverse maps with opposite log-determinants', () => {
    const model = new StateSpaceModel(small({ generativeFlow: [{ kind: 'tril' }, { kind: 'coupling' }] }), 4);
    tf.tidy(() => {
      const hPrev = tf.randomNormal([6, 3], 0, 1, 'float32', 1) as tf.Tensor2D;
      const xi = tf.randomNormal([6, 3], 0, 1, 'float32', 2) as tf.Tensor2D;
      const h = model.transition(hPrev, xi);
      const back = model.transitionInverse(hPrev, h);
      expect(tf.max(tf.abs(tf.sub(back.xi, xi))).dataSync()[0]).toBeLessThan(1e-4);
      const fwd = model.generativeFlow.forward(hPrev, xi).logdet;
      expect(tf.max(tf.abs(tf.add(fwd, back.logdet))).dataSync()[0]).toBeLessThan(1e-4);
    });
    model.dispose();
  });

  it('rejects bad settings and wrongly shaped weights with a clear message, changing nothing', () => {
    expect(() => validateSsmSettings(small({ stateSize: 0 }))).toThrow(/"stateSize" must be a whole number from 1/);
    expect(() => validateSsmSettings(small({ generativeFlow: [] }))).toThrow(/generative flow needs at least one layer/);
    const model = new StateSpaceModel(small(), 5);
    const good = model.getWeights();
    const wrong = structuredClone(good);
    wrong['h0'] = { shape: [4], values: new Float32Array(4) };
    expect(() => model.setWeights(wrong)).toThrow(WeightShapeError);
    expect(() => model.setWeights(wrong)).toThrow(/"h0" has shape \[4\]/);
    const missing = structuredClone(good);
    delete missing['obs.b'];
    expect(() => model.setWeights(missing)).toThrow(/no tensor "obs.b"/);
    expect(model.getWeights()).toEqual(good);
    expect(() => model.logWeights(encodeBatch(['al'], alphabet), 0)).toThrow(/positive whole number/);
    const foreign = encodeBatch(['al'], alphabet);
    foreign.ids[0] = alphabet.size; // one past the last id
    expect(() => model.logWeights(foreign, 2)).toThrow(/outside this model's vocabulary/);
    model.dispose();
  });
});
