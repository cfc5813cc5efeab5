import * as tf from '@tensorflow/tfjs-core';
import normalLogPdf from '@stdlib/stats-base-dists-normal-logpdf';
import { beforeAll, describe, expect, it } from 'vitest';
import { initNodeBackend } from '../node/tf-node';
import { diagNormalLogPdf, diagNormalLogPdfFromEps, standardNormalLogPdf } from './gaussian';

beforeAll(async () => {
  await initNodeBackend();
});

describe('Gaussian log-densities', () => {
  const x = [
    [0.3, -1.2, 2.5],
    [-4, 0, 0.01],
  ];
  const mean = [
    [0.1, 0.2, -0.3],
    [1, -1, 0],
  ];
  const std = [
    [0.5, 2, 1e-2],
    [3, 0.9, 1],
  ];

  it('standard normal, summed over the last axis, agrees with @stdlib normal logpdf', () => {
    const got = tf.tidy(() => standardNormalLogPdf(tf.tensor2d(x)).arraySync() as number[]);
    x.forEach((row, n) => {
      // Reference: @stdlib/stats-base-dists-normal-logpdf (npm).
      const ref = row.reduce((s, v) => s + normalLogPdf(v, 0, 1), 0);
      expect(got[n]).toBeCloseTo(ref, 4);
    });
  });

  it('diagonal normal agrees with @stdlib normal logpdf, also in the eps / log-std form', () => {
    const got = tf.tidy(() => diagNormalLogPdf(tf.tensor2d(x), tf.tensor2d(mean), tf.tensor2d(std)).arraySync() as number[]);
    const got2 = tf.tidy(() => {
      const eps = tf.div(tf.sub(tf.tensor2d(x), tf.tensor2d(mean)), tf.tensor2d(std));
      return diagNormalLogPdfFromEps(eps, tf.log(tf.tensor2d(std))).arraySync() as number[];
    });
    x.forEach((row, n) => {
      // Reference: @stdlib/stats-base-dists-normal-logpdf (npm).
      const ref = row.reduce((s, v, i) => s + normalLogPdf(v, mean[n]?.[i] as number, std[n]?.[i] as number), 0);
      // float32: relative tolerance for large magnitudes (the std = 0.01 entry gives about -3e4).
      expect(Math.abs((got[n] as number) - ref)).toBeLessThan(1e-5 * Math.max(1, Math.abs(ref)));
      expect(Math.abs((got2[n] as number) - ref)).toBeLessThan(1e-5 * Math.max(1, Math.abs(ref)));
    });
  });
});
