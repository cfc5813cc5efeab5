/**
 * Noise-map data (the picture of the generative flow at a chosen state): noise points xi — a grid over two
 * chosen noise dimensions with the others at 0, or a sample xi ~ N(0, I) — mapped through h = f_g(h_{t-1}, xi),
 * each with the most likely next character under p(. | h) and its probability.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { Alphabet } from '../data/encode';
import type { SsmView } from './model-view';

export type NoiseMapPoints =
  | { mode: 'grid'; dims: [number, number]; range?: number; steps?: number }
  | { mode: 'sample'; dims: [number, number]; count: number; seed: number };

export interface NoiseMapPoint {
  /** The noise coordinates in the two chosen dimensions. */
  noise: [number, number];
  /** The mapped state h in the same two dimensions. */
  state: [number, number];
  /** Most likely next symbol: a character, or null for EOW. */
  char: string | null;
  prob: number;
}

export interface NoiseMap { dims: [number, number]; from: number[]; points: NoiseMapPoint[] }

export function noiseMap(model: SsmView, alphabet: Alphabet, from: ArrayLike<number>, opts: NoiseMapPoints): NoiseMap {
  const d = from.length;
  const [i, j] = opts.dims;
  if (!Number.isInteger(i) || !Number.isInteger(j) || i < 0 || j < 0 || i >= d || j >= d || i === j) {
    throw new Error(`Choose two different noise dimensions between 0 and ${d - 1} (got ${i} and ${j}).`);
  }
  let xi: Float32Array;
  let n: number;
  if (opts.mode === 'grid') {
    const steps = opts.steps ?? 41;
    const range = opts.range ?? 3;
    if (!Number.isInteger(steps) || steps < 2 || steps > 401) throw new Error(`Grid steps must be a whole number from 2 to 401 (got ${steps}).`);
    if (!(range > 0)) throw new Error(`The grid range must be positive (got ${range}).`);
    n = steps * steps;
    xi = new Float32Array(n * d);
    for (let a = 0; a < steps; a++) {
      for (let b = 0; b < steps; b++) {
        const r = a * steps + b;
        xi[r * d + i] = -range + (2 * range * a) / (steps - 1);
        xi[r * d + j] = -range + (2 * range * b) / (steps - 1);
      }
    }
  } else {
    n = opts.count;
    if (!Number.isInteger(n) || n < 1) throw new Error(`The number of noise points must be a positive whole number (got ${n}).`);
    xi = tf.tidy(() => (tf.randomNormal([n, d], 0, 1, 'float32', opts.seed).dataSync() as Float32Array).slice());
  }
  const [hs, best, bestP] = tf.tidy(() => {
    const hPrev = tf.tile(tf.tensor2d(Float32Array.from(from), [1, d]), [n, 1]) as tf.Tensor2D;
    const h = model.transition(hPrev, tf.tensor2d(xi, [n, d]));
    const lp = model.observationLogProbs(h);
    return [h, tf.argMax(lp, 1), tf.exp(tf.max(lp, 1))];
  });
  const hv = hs.dataSync();
  const bv = best.dataSync();
  const pv = bestP.dataSync();
  hs.dispose(); best.dispose(); bestP.dispose();
  const points: NoiseMapPoint[] = [];
  for (let r = 0; r < n; r++) {
    const c = bv[r] as number;
    points.push({
      noise: [xi[r * d + i] as number, xi[r * d + j] as number],
      state: [hv[r * d + i] as number, hv[r * d + j] as number],
      char: c === 0 ? null : (alphabet.chars[c - 1] as string),
      prob: pv[r] as number,
    });
  }
  return { dims: [i, j], from: Array.from(from), points };
}
