import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet, encodeBatch } from '../data/encode';
import { initNodeBackend } from '../node/tf-node';
import { GruLanguageModel, GruTrainer, NonFiniteLossError, type GruSettings } from './gru-lm';
import type { NamedWeights } from './params';

beforeAll(async () => { await initNodeBackend('wasm'); });

const words = ['ana', 'bob', 'abba', 'b', 'nab'];
const alphabet = buildAlphabet(words);

/** Plain float64 GRU language model, written from the equations of Cho et al. (2014), eq. 5–8. */
function referenceLogLik(word: number[], w: NamedWeights, s: GruSettings): number {
  const d = s.stateSize; const e = s.embeddingSize; const v = s.vocabSize;
  const at = (name: string, i: number, j: number, cols: number) => (w[name] as NamedWeights[string]).values[i * cols + j] as number;
  const sig = (x: number) => 1 / (1 + Math.exp(-x));
  let h = Array.from((w['h0'] as NamedWeights[string]).values);
  let prev = 0; // w_0 = EOW
  let ll = 0;
  for (const target of word) {
    const x = Array.from({ length: e }, (_, k) => at('emb', prev, k, e));
    const pre = (col: number, useH: number[] | null, uName: string, uCol: number, uCols: number) => {
      let sum = (w['bx'] as NamedWeights[string]).values[col] as number;
      for (let k = 0; k < e; k++) sum += (x[k] as number) * at('Wx', k, col, 3 * d);
      if (useH) for (let k = 0; k < d; k++) sum += (useH[k] as number) * at(uName, k, uCol, uCols);
      return sum;
    };
    const z = h.map((_, j) => sig(pre(j, h, 'Uzr', j, 2 * d)));
    const r = h.map((_, j) => sig(pre(d + j, h, 'Uzr', d + j, 2 * d)));
    const rh = h.map((hj, j) => (r[j] as number) * hj);
    const cand = h.map((_, j) => Math.tanh(pre(2 * d + j, rh, 'Uh', j, d)));
    h = h.map((hj, j) => (z[j] as number) * hj + (1 - (z[j] as number)) * (cand[j] as number));
    const logits = Array.from({ length: v }, (_, c) => {
      let sum = (w['bo'] as NamedWeights[string]).values[c] as number;
      for (let k = 0; k < d; k++) sum += (h[k] as number) * at('Wo', k, c, v);
      return sum;
    });
    const m = Math.max(...logits);
    const lse = m + Math.log(logits.reduce((acc, l) => acc + Math.exp(l - m), 0));
    ll += (logits[target] as number) - lse;
    prev = target;
  }
  return ll;
}

describe('GruLanguageModel', () => {
  const settings: GruSettings = { vocabSize: alphabet.size, stateSize: 3, embeddingSize: 2, observationHidden: 0 };

  it('matches a float64 reimplementation of the Cho et al. (2014) GRU equations within 1e-5', () => {
    const model = new GruLanguageModel(settings, 7);
    // Hand-set weights: a fixed deterministic pattern, large enough to make every gate matter.
    const weights = model.getWeights();
    let i = 0;
    for (const w of Object.values(weights)) for (let k = 0; k < w.values.length; k++) w.values[k] = 0.9 * Math.sin(1.3 * ++i);
    model.setWeights(weights);
    const batch = encodeBatch(words, alphabet);
    const ll = model.logLikelihood(batch);
    const got = Array.from(ll.dataSync());
    ll.dispose();
    words.forEach((word, b) => {
      const ids = Array.from(batch.ids.subarray(b * batch.maxLen, b * batch.maxLen + (batch.lengths[b] as number)));
      expect(Math.abs((got[b] as number) - referenceLogLik(ids, weights, settings))).toBeLessThan(1e-5);
    });
    model.dispose();
  });

  it('gives next-character distributions that sum to one (closed form of softmax)', () => {
    const model = new GruLanguageModel({ ...settings, observationHidden: 5 }, 3);
    const lp = model.predictiveLogProbs(encodeBatch(words, alphabet));
    const sums = tf.tidy(() => tf.sum(tf.exp(lp), 1).dataSync());
    lp.dispose();
    for (const s of sums) expect(Math.abs(s - 1)).toBeLessThan(1e-5);
    model.dispose();
  });

  it('trains without leaking tensors and lowers the loss', () => {
    const model = new GruLanguageModel({ ...settings, stateSize: 8, embeddingSize: 8 }, 1);
    const trainer = new GruTrainer(model, { learningRate: 0.05, clipNorm: 5 });
    const batch = encodeBatch(words, alphabet);
    const first = trainer.step(batch);
    const before = tf.memory().numTensors;
    let last = first;
    for (let s = 0; s < 30; s++) last = trainer.step(batch);
    expect(tf.memory().numTensors).toBe(before);
    expect(last.loss).toBeLessThan(first.loss - 1); // common practice (no source): 30 Adam steps fit 5 words
    // bits/char = nats/word · words / characters / ln 2 (definition)
    expect(last.boundBitsPerChar).toBeCloseTo((-last.loss * 5) / (4 + 4 + 5 + 2 + 4) / Math.LN2, 6);
    trainer.dispose();
    model.dispose();
  });

  it('stops on a non-finite loss and keeps the weights of the last good step', () => {
    const model = new GruLanguageModel(settings, 2);
    const w = model.getWeights();
    (w['bo'] as NamedWeights[string]).values[0] = Number.NaN;
    model.setWeights(w);
    const trainer = new GruTrainer(model, { learningRate: 0.1, clipNorm: 1 });
    expect(() => trainer.step(encodeBatch(words, alphabet))).toThrow(NonFiniteLossError);
    expect(model.getWeights()).toEqual(w);
    trainer.dispose();
    model.dispose();
  });

  it('rejects weights of the wrong shape without changing the model', () => {
    const model = new GruLanguageModel(settings, 2);
    const w = model.getWeights();
    const bad = { ...w, Uh: { shape: [2, 2], values: new Float32Array(4) } };
    expect(() => model.setWeights(bad)).toThrow(/"Uh" has shape \[2, 2\]/);
    expect(model.getWeights()).toEqual(w);
    // parameter count: V·E + d + E·3d + d·2d + d·d + 3d + d·V + V (count of the fused GRU tensors)
    const v = alphabet.size;
    expect(model.parameterCount).toBe(v * 2 + 3 + 2 * 9 + 3 * 6 + 9 + 9 + 3 * v + v);
    model.dispose();
  });
});
