/**
 * The model's log-weights against an exact likelihood: a tiny model (d = 1, V = 2) whose generative weights are
 * set by hand, so log p(w) = log ∫ Π_t p(w_t | h_t) N(xi_t; 0, 1) dxi can be computed by nested Gauss–Hermite
 * quadrature in float64, independently of the model code.
 */
import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet, encodeBatch, encodeWord } from '../data/encode';
import { initNodeBackend } from '../node/tf-node';
import { iwaeBound } from './bounds';
import { StateSpaceModel } from './ssm';
import { defaultSsmSettings } from './ssm-settings';
import { standardNormalRule } from './testing/gauss-hermite';

beforeAll(async () => {
  await initNodeBackend();
});

// Hand-set generative part: h_0, the diagonal flow's conditioner (1 -> 2 tanh -> [mu, pre-sigma]), observation.
const H0 = 0.3;
const W1 = [1.2, -0.7];
const B1 = [0.1, -0.2];
const W2 = [
  [0.8, 0.3],
  [-0.5, 0.6],
];
const B2 = [0.1, -0.4];
const OBS_W = [-1.5, 1.5];
const OBS_B = [0.2, -0.1];

const softplus = (x: number) => Math.log1p(Math.exp(x));

/** h_t = mu(h) + sigma(h) * xi with sigma = softplus + 1e-4 (MODEL.md section 3), in float64. */
function transition(h: number, xi: number): number {
  const a = W1.map((w, j) => Math.tanh(h * w + (B1[j] as number)));
  const mu = (a[0] as number) * (W2[0]?.[0] as number) + (a[1] as number) * (W2[1]?.[0] as number) + (B2[0] as number);
  const pre = (a[0] as number) * (W2[0]?.[1] as number) + (a[1] as number) * (W2[1]?.[1] as number) + (B2[1] as number);
  return mu + (softplus(pre) + 1e-4) * xi;
}

/** log p(c | h) of the linear observation layer with V = 2, in float64. */
function logObs(h: number, c: number): number {
  const l0 = h * (OBS_W[0] as number) + (OBS_B[0] as number);
  const l1 = h * (OBS_W[1] as number) + (OBS_B[1] as number);
  const m = Math.max(l0, l1);
  const lse = m + Math.log(Math.exp(l0 - m) + Math.exp(l1 - m));
  return (c === 0 ? l0 : l1) - lse;
}

/** Exact p(w) by nested Gauss–Hermite quadrature over xi_1..xi_T (n nodes per step). */
function exactLogLikelihood(ids: number[], n: number): number {
  const rule = standardNormalRule(n);
  const integrate = (h: number, t: number): number => {
    if (t === ids.length) return 1;
    let sum = 0;
    rule.nodes.forEach((x, i) => {
      const next = transition(h, x);
      sum += (rule.weights[i] as number) * Math.exp(logObs(next, ids[t] as number)) * integrate(next, t + 1);
    });
    return sum;
  };
  return Math.log(integrate(H0, 0));
}

/**
 * `close`: the inference flow is the generative one slightly perturbed and the proposal is near N(0.2, 1.1²)
 * (every term of log W is active, but the weights have low variance); otherwise the inference network keeps
 * its seeded random weights (any proposal gives a valid estimator, just a noisier one).
 */
function tinyModel(close = false): StateSpaceModel {
  const settings = defaultSsmSettings(2, {
    stateSize: 1,
    flowHidden: 2,
    embeddingSize: 2,
    encoderSize: 3,
    proposalHidden: 3,
  });
  const model = new StateSpaceModel(settings, 'exact-likelihood');
  const w = model.getWeights();
  const put = (name: string, values: number[]) => {
    const t = w[name];
    if (!t || t.values.length !== values.length) throw new Error(`test set-up: no weight ${name} of size ${values.length}`);
    t.values.set(values);
  };
  put('h0', [H0]);
  put('gen/0.diag.net.w1', W1);
  put('gen/0.diag.net.b1', B1);
  put('gen/0.diag.net.w2', W2.flat());
  put('gen/0.diag.net.b2', B2);
  put('obs.w', OBS_W);
  put('obs.b', OBS_B);
  if (close) {
    put('inf/0.diag.net.w1', W1.map((v) => v * 1.1));
    put('inf/0.diag.net.b1', B1);
    put('inf/0.diag.net.w2', W2.flat().map((v) => v * 0.9));
    put('inf/0.diag.net.b2', [(B2[0] as number) + 0.05, B2[1] as number]);
    const w2 = w['prop.w2'] as { values: Float32Array };
    w2.values.set(w2.values.map((v) => 0.2 * v));
    put('prop.b2', [0.2, Math.log(Math.expm1(1.1 - 1e-4))]);
  }
  model.setWeights(w);
  return model;
}

const mean = (a: number[]) => a.reduce((s, v) => s + v, 0) / a.length;
const stdErr = (a: number[]) => Math.sqrt(a.reduce((s, v) => s + (v - mean(a)) ** 2, 0) / (a.length - 1) / a.length);

describe('exact likelihood of a tiny model', () => {
  const alphabet = buildAlphabet(['a']);
  const words = ['a', 'aa']; // T = 2 and T = 3; batched together so the shorter one is padded and masked
  const exact = words.map((w) => exactLogLikelihood(Array.from(encodeWord(w, alphabet)), 40));

  it('quadrature has converged (40 vs 30 nodes per step agree)', () => {
    words.forEach((w, i) => {
      expect(exactLogLikelihood(Array.from(encodeWord(w, alphabet)), 30)).toBeCloseTo(exact[i] as number, 6);
    });
    // Sanity of the reference itself: a probability of a sequence is below 1 and longer words are rarer here.
    expect(exact[0] as number).toBeLessThan(0);
    expect(exact[1] as number).toBeLessThan(exact[0] as number);
  });

  it.each([
    ["a close proposal", true, 0.02],
    ['the seeded random inference network', false, 0.1],
  ])('the IWAE estimate with large K agrees with the exact log-likelihood within 3 standard errors (%s)', (_, close, maxSe) => {
    const model = tinyModel(close);
    const batch = encodeBatch(words, alphabet);
    const repeats = 8;
    const estimates: number[][] = words.map(() => []);
    for (let r = 0; r < repeats; r++) {
      const lk = tf.tidy(() => iwaeBound(model.logWeights(batch, 4096, { seed: 1000 + r }).logW).arraySync());
      lk.forEach((v, i) => estimates[i]?.push(v));
    }
    words.forEach((_, i) => {
      const e = estimates[i] as number[];
      const se = stdErr(e);
      // Burda, Grosse & Salakhutdinov (2016): L_K -> log p(w) as K grows; 3 standard errors, common practice.
      expect(se).toBeGreaterThan(0);
      expect(se).toBeLessThan(maxSe); // the check is only meaningful if the estimate is tight
      expect(Math.abs(mean(e) - (exact[i] as number))).toBeLessThan(3 * se + 1e-4);
    });
    model.dispose();
  });

  it('ELBO <= L_8 <= L_64 <= log p(w) on average (Burda, Grosse & Salakhutdinov 2016, theorem 1)', () => {
    const model = tinyModel();
    const batch = encodeBatch(words, alphabet);
    const average = (k: number, seed: number) => {
      const groups = 4096 / k;
      const values: number[][] = words.map(() => []);
      for (let s = 0; s < 4; s++) {
        const lk = tf.tidy(() => {
          const logW = model.logWeights(batch, 1024, { seed: seed + s }).logW; // [B, 1024]
          const grouped = tf.reshape(logW, [words.length * (1024 / k), k]) as tf.Tensor2D;
          return tf.reshape(iwaeBound(grouped), [words.length, 1024 / k]).arraySync() as number[][];
        });
        lk.forEach((row, i) => values[i]?.push(...row));
      }
      expect(values[0]?.length).toBe(groups);
      return values.map((v) => ({ mean: mean(v), se: stdErr(v) }));
    };
    const l1 = average(1, 10);
    const l8 = average(8, 20);
    const l64 = average(64, 30);
    words.forEach((_, i) => {
      const [a, b, c] = [l1[i], l8[i], l64[i]] as { mean: number; se: number }[];
      const se = (x: { se: number }, y: { se: number }) => 3 * Math.hypot(x.se, y.se);
      expect(a!.mean).toBeLessThan(b!.mean + se(a!, b!));
      expect(b!.mean).toBeLessThan(c!.mean + se(b!, c!));
      expect(c!.mean).toBeLessThan((exact[i] as number) + 3 * c!.se);
      // The gaps are real here, not only allowed: the ELBO is clearly below the 64-sample bound.
      expect(a!.mean).toBeLessThan(c!.mean - se(a!, c!));
    });
    model.dispose();
  });
});
