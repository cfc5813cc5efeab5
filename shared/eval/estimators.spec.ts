import * as tf from '@tensorflow/tfjs-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet, encodeWord } from '../data/encode';
import { initNodeBackend } from '../node/tf-node';
import { StateSpaceModel } from '../model/ssm';
import { defaultSsmSettings } from '../model/ssm-settings';
import { completePrefix, resampleIndices } from './completion';
import { dataEntropy } from './corpus-entropy';
import { mutualInformationFromLogProbs, noiseInformation } from './noise-information';
import { noiseMap } from './noise-map';
import { gruPredictiveEntropy, ssmObservationEntropy } from './observation-entropy';
import { sampleReport, sampleWords } from './samples';
import { ssmSequenceCrossEntropy } from './sequence-cross-entropy';
import { scoreWithTables, sharedTrajectoryLogProbs, trajectoryTables } from './shared-trajectories';
import { tightEstimate } from './tight-estimate';
import { createRng } from '../data/random';
import { GruLanguageModel } from '../model/gru-lm';

const words = ['ana', 'bob', 'abba', 'b', 'nab', 'anna', 'bonn'];
const alphabet = buildAlphabet(words);
let model: StateSpaceModel;

beforeAll(async () => {
  await initNodeBackend('wasm');
  model = new StateSpaceModel(defaultSsmSettings(alphabet.size, {
    stateSize: 4, flowHidden: 8, encoderSize: 8, proposalHidden: 8, embeddingSize: 4,
    generativeFlow: [{ kind: 'coupling' }, { kind: 'diag' }],
  }), 11);
  // Sharpen the observation layer so that the noise matters (an untrained model is nearly uniform).
  const w = model.getWeights();
  const ow = w['obs.w'];
  if (ow) for (let i = 0; i < ow.values.length; i++) ow.values[i] = 2.5 * Math.sin(3.7 * i + 1);
  model.setWeights(w);
});
afterAll(() => model.dispose());

/** Runs `fn` and checks that it leaves no tensor behind (tensor hygiene, DEVELOPERS.md). */
function noLeak<T>(fn: () => T): T {
  const before = tf.memory().numTensors;
  const out = fn();
  expect(tf.memory().numTensors).toBe(before);
  return out;
}

describe('shared-trajectory scoring', () => {
  it('equals a float64 logsumexp over the same trajectories, scored all at once or one word at a time', () => {
    const seqs = words.map((w) => encodeWord(w, alphabet));
    const tables = trajectoryTables(model, 6, { samples: 40, seed: 5, sampleChunk: 16 });
    const all = scoreWithTables(tables, seqs, 3);
    const a = tables.map((t) => t.arraySync() as number[][][]).flat();
    seqs.forEach((seq, i) => {
      const one = scoreWithTables(tables, [seq]);
      expect(Math.abs((one[0] as number) - (all[i] as number))).toBeLessThan(1e-5);
      // Definition in MODEL.md §7: log p̂(w) = logsumexp_s Σ_t A[s,t,w_t] − log S, in plain float64.
      const sums = a.map((rows) => Array.from(seq).reduce((s, c, t) => s + (rows[t] as number[])[c]!, 0));
      const m = Math.max(...sums);
      const ref = m + Math.log(sums.reduce((s, x) => s + Math.exp(x - m), 0)) - Math.log(sums.length);
      expect(Math.abs((all[i] as number) - ref)).toBeLessThan(1e-5);
    });
    for (const t of tables) t.dispose();
  });

  it('gives the sequence cross entropy, H(p_data), the KL gap and the mass without leaking tensors', () => {
    const corpus = words.map((word, i) => ({ word, count: i + 1 }));
    const ce = noLeak(() => ssmSequenceCrossEntropy(model, corpus, alphabet, { samples: 64, iwaeK: 8, seed: 3 }));
    // identity: KL gap = H(p_data, p_model) − H(p_data) (definition)
    expect(ce.shared.klGapBits).toBeCloseTo(ce.shared.crossEntropyBits - ce.shared.dataEntropyBits, 10);
    expect(ce.shared.modelMass).toBeGreaterThan(0);
    expect(ce.shared.modelMass).toBeLessThan(1); // seven words cannot hold all of p_model's mass
    expect(ce.iwae?.crossEntropyBits).toBeGreaterThan(ce.shared.dataEntropyBits - 1e-9);
  });
});

describe('corpus entropy', () => {
  // Hand calculation: p = (1/2, 1/4, 1/4) → H = 1/2·1 + 2·1/4·2 = 1.5 bits.
  it('matches a hand calculation', () => {
    expect(dataEntropy([{ word: 'a', count: 2 }, { word: 'b', count: 1 }, { word: 'c', count: 1 }]) / Math.LN2).toBeCloseTo(1.5, 12);
  });
});

describe('noise mutual information', () => {
  // Definition of mutual information as H(mixture) − mean H(component) (Cover & Thomas, Elements of
  // Information Theory, eq. 2.45 — from memory), computed in float64 from the same categorical distributions.
  it('equals a float64 computation from the same distributions and lies in [0, log V]', () => {
    const m = 64;
    const rng = createRng(9);
    const rows = 5;
    const hPrev = tf.tensor2d(Float32Array.from({ length: rows * 4 }, () => rng.normal()), [rows, 4]);
    const rep = tf.reshape(tf.tile(hPrev, [1, m]), [rows * m, 4]) as tf.Tensor2D;
    const lp = tf.tidy(() => model.observationLogProbs(model.transition(rep, tf.randomNormal([rows * m, 4], 0, 1, 'float32', 4) as tf.Tensor2D)));
    const got = mutualInformationFromLogProbs(lp, m).dataSync();
    const lpv = lp.arraySync();
    const v = alphabet.size;
    for (let r = 0; r < rows; r++) {
      const comps = lpv.slice(r * m, (r + 1) * m).map((row) => row.map(Math.exp));
      const h = (p: number[]) => -p.reduce((s, x) => s + (x > 0 ? x * Math.log(x) : 0), 0);
      const mix = Array.from({ length: v }, (_, c) => comps.reduce((s, p) => s + (p[c] as number), 0) / m);
      const ref = h(mix) - comps.reduce((s, p) => s + h(p), 0) / m;
      expect(Math.abs((got[r] as number) - ref)).toBeLessThan(1e-5);
      expect(got[r]).toBeGreaterThan(-1e-5);
      expect(got[r]).toBeLessThan(Math.log(v) + 1e-6);
    }
    tf.dispose([hPrev, rep, lp]);
  });

  it('reports per-word, per-position values inside [0, log V] without leaking tensors', () => {
    const mi = noLeak(() => noiseInformation(model, words, alphabet, { draws: 64, seed: 2 }));
    expect(mi.perWord.map((w) => w.bits.length)).toEqual(words.map((w) => w.length + 1));
    for (const w of mi.perWord) for (const b of w.bits) {
      expect(b).toBeGreaterThan(-1e-4);
      expect(b).toBeLessThanOrEqual(mi.maxBits + 1e-6);
    }
    expect(mi.perPosition[0]?.n).toBe(words.length);
    expect(mi.meanBits).toBeGreaterThan(0.01); // the sharpened observation layer makes the noise matter
  });
});

describe('observation entropy, tight estimate, samples', () => {
  it('gives observation entropies in [0, log V] for the SSM and the GRU baseline', () => {
    const ssm = noLeak(() => ssmObservationEntropy(model, words, alphabet, { seed: 1 }));
    const gru = new GruLanguageModel({ vocabSize: alphabet.size, stateSize: 4, embeddingSize: 4, observationHidden: 0 }, 1);
    const base = noLeak(() => gruPredictiveEntropy(gru, words, alphabet));
    gru.dispose();
    for (const e of [ssm, base]) {
      expect(e.meanBits).toBeGreaterThan(0);
      expect(e.meanBits).toBeLessThan(Math.log2(alphabet.size) + 1e-6);
      expect(e.perWord).toHaveLength(words.length);
    }
  });

  // IWAE ordering L_1 ≤ L_K in expectation (Burda, Grosse & Salakhutdinov 2016, Theorem 1).
  it('gives a tighter bound with more samples and a spread over repeats', () => {
    const k1 = noLeak(() => tightEstimate(model, words, alphabet, { k: 1, repeats: 4, seed: 1 }));
    const k64 = noLeak(() => tightEstimate(model, words, alphabet, { k: 64, sampleChunk: 16, repeats: 2, seed: 1 }));
    expect(k64.bitsPerWord).toBeLessThan(k1.bitsPerWord);
    expect(k1.stdBitsPerWord).toBeGreaterThan(0);
    expect(k64.repeatBitsPerWord).toHaveLength(2);
  });

  it('samples words and classifies them as training, held-out or novel', () => {
    const s = noLeak(() => sampleWords(model, alphabet, { n: 300, tMax: 8, seed: 4 }));
    expect(s.words).toHaveLength(300);
    const rep = sampleReport(s.words, new Set(words.slice(0, 4)), new Set(words.slice(4)), words.map((word) => ({ word, count: 1 })));
    const { train, heldOut, novel } = rep.shares;
    expect(train + heldOut + novel).toBeCloseTo(1, 12);
    expect(rep.lengthHistogram.samples.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
    // every sampled character comes from the alphabet (ids map back to characters)
    for (const w of s.words) for (const c of w) expect(alphabet.chars).toContain(c);
  });
});

describe('completion by particle filter', () => {
  // Property of sequential importance resampling: the product of mean weights is an unbiased estimate of
  // p(prefix) (Doucet & Johansen 2009, "A tutorial on particle filtering and smoothing" — from memory).
  // Its log must match a plain prior-sampling estimate log mean_s Π_t p(w_t | h_t^(s)) with many trajectories.
  it('estimates log p(prefix) like prior sampling and returns weighted continuations', () => {
    const prefix = 'ab';
    const c = noLeak(() => completePrefix(model, alphabet, prefix, { particles: 3000, tMax: 8, seed: 6 }));
    const ids = Array.from(encodeWord(prefix, alphabet)).slice(0, -1);
    const ref = noLeak(() => sharedTrajectoryLogProbs(model, [ids], { samples: 20000, seed: 8, sampleChunk: 5000 }))[0] as number;
    expect(Math.abs(c.logPrefix - ref)).toBeLessThan(0.08);
    expect(c.continuations.reduce((s, x) => s + x.weight, 0)).toBeCloseTo(1, 9);
    for (const x of c.continuations) expect(x.word.startsWith(prefix)).toBe(true);
    expect(c.meanState).toHaveLength(4);
  });

  // Systematic resampling puts floor(N·w_i) or ceil(N·w_i) copies of particle i, i.e. |n_i − N·w_i| < 1 (Douc,
  // Cappé & Moulines 2005, "Comparison of resampling schemes for particle filtering" — from memory). With 200
  // particles and weights w_i ∝ exp(−i/20) (N·w_0 ≈ 9.8), a resampler that ignores the weights gives n_i = 1 and fails.
  it('resamples in proportion to the weights (systematic: each count strictly within 1 of N·w)', () => {
    const n = 200;
    const raw = Array.from({ length: n }, (_, i) => Math.exp(-i / 20));
    const total = raw.reduce((a, b) => a + b, 0);
    const w = raw.map((x) => x / total);
    for (const seed of [1, 2, 3]) {
      const idx = resampleIndices(w, createRng(seed), 'systematic');
      expect(idx).toHaveLength(n);
      const counts = new Array<number>(n).fill(0);
      for (const i of idx) counts[i]! += 1;
      counts.forEach((c, i) => expect(Math.abs(c - n * (w[i] as number))).toBeLessThan(1));
    }
  });

  // Multinomial resampling: counts are Multinomial(N, w); pooled over 50 draws of N = 200 the share of particle 0
  // is w_0 ± 3·√(w_0(1−w_0)/10000) (binomial standard error; common practice, no source).
  it('resamples multinomially with the right expected shares', () => {
    const n = 200;
    const raw = Array.from({ length: n }, (_, i) => Math.exp(-i / 20));
    const total = raw.reduce((a, b) => a + b, 0);
    const w0 = (raw[0] as number) / total;
    let hits = 0;
    for (let r = 0; r < 50; r++) for (const i of resampleIndices(raw.map((x) => x / total), createRng(100 + r), 'multinomial')) if (i === 0) hits++;
    expect(Math.abs(hits / 10_000 - w0)).toBeLessThan(3 * Math.sqrt((w0 * (1 - w0)) / 10_000));
  });
});

describe('noise map', () => {
  it('maps a grid of noise points to states with the most likely next character', () => {
    const h0 = model.initialState();
    const from = h0.dataSync().slice();
    h0.dispose();
    const map = noLeak(() => noiseMap(model, alphabet, from, { mode: 'grid', dims: [0, 2], steps: 5, range: 2 }));
    expect(map.points).toHaveLength(25);
    expect(map.points[0]?.noise).toEqual([-2, -2]);
    for (const p of map.points) {
      expect(p.prob).toBeGreaterThanOrEqual(1 / alphabet.size - 1e-6); // the mode of V outcomes has at least 1/V
      expect(p.prob).toBeLessThanOrEqual(1);
    }
    expect(() => noiseMap(model, alphabet, from, { mode: 'grid', dims: [1, 1] })).toThrow(/two different noise dimensions/);
  });
});
