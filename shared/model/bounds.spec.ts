import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { initNodeBackend } from '../node/tf-node';
import { elbo, iwaeBound, natsToBits, perCharacter, summariseBound } from './bounds';

beforeAll(async () => {
  await initNodeBackend();
});

/** log((1/K) sum_k exp(a_k)) in float64, shifted by the maximum (closed form). */
function logMeanExp(a: number[]): number {
  const m = Math.max(...a);
  return m + Math.log(a.reduce((s, v) => s + Math.exp(v - m), 0) / a.length);
}

describe('bounds from log-weights', () => {
  const logW = [
    [-3.2, -1.1, -2.7, -5.0],
    [-1200.5, -1199.0, -1203.25, -1201.0], // far below exp underflow: must still be exact in log space
  ];

  it('IWAE bound is logsumexp - log K per word, without underflow', () => {
    const got = tf.tidy(() => iwaeBound(tf.tensor2d(logW)).arraySync());
    // Reference: closed form log-mean-exp (Burda, Grosse & Salakhutdinov 2016, eq. 8 with the sum over k).
    expect(got[0]).toBeCloseTo(logMeanExp(logW[0] as number[]), 5);
    expect(got[1]).toBeCloseTo(logMeanExp(logW[1] as number[]), 3);
    expect(Number.isFinite(got[1])).toBe(true);
  });

  it('ELBO is the mean log-weight and never exceeds the IWAE bound (Jensen)', () => {
    const e = tf.tidy(() => elbo(tf.tensor2d(logW)).arraySync());
    const l = tf.tidy(() => iwaeBound(tf.tensor2d(logW)).arraySync());
    expect(e[0]).toBeCloseTo((-3.2 - 1.1 - 2.7 - 5.0) / 4, 5);
    expect(e[0] as number).toBeLessThan(l[0] as number);
    expect(e[1] as number).toBeLessThan(l[1] as number);
  });

  it('converts nats to bits and divides by the word length including EOW', () => {
    // Closed form: 1 nat = 1 / ln 2 bits = 1.4426950408889634 bits (NumPy 1.24.2: 1/np.log(2); equals Math.LOG2E).
    expect(natsToBits(1)).toBeCloseTo(1.4426950408889634, 14);
    const per = tf.tidy(() => perCharacter(tf.tensor1d([-6, -9]), Int32Array.of(3, 4)).arraySync());
    expect(per).toEqual([-2, -2.25]);
    const s = summariseBound([-6, -9], Int32Array.of(3, 4));
    expect(s.natsPerWord).toBe(-7.5);
    expect(s.bitsPerChar).toBeCloseTo(-15 / 7 / Math.LN2, 12);
    expect(() => perCharacter(tf.tensor1d([1]), Int32Array.of(1, 2))).toThrow(/one length per word/);
  });
});
