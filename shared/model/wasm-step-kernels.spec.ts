import * as tf from '@tensorflow/tfjs-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { initNodeBackend } from '../node/tf-node';

// References: TF.js's own CPU backend (@tensorflow/tfjs-backend-cpu 4.22.0 from the npm registry), whose
// BatchMatMul, Tanh and Identity kernels are independent of the WASM backend's, and float64 arithmetic in plain
// JavaScript (a triple loop for matmul; Math.tanh, ECMAScript's tanh, for tanh).

function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

async function on<T>(name: 'cpu' | 'wasm', f: () => T): Promise<T> {
  await initNodeBackend(name);
  expect(tf.getBackend()).toBe(name);
  return f();
}

/** C = op(A) op(B) in float64, A and B row-major with the given shapes. */
function matMul64(a: number[], aShape: [number, number], b: number[], bShape: [number, number], ta: boolean, tb: boolean): number[] {
  const [m, k] = ta ? [aShape[1], aShape[0]] : aShape;
  const n = tb ? bShape[0] : bShape[1];
  const A = (i: number, p: number) => (ta ? a[p * aShape[1] + i] : a[i * aShape[1] + p]) as number;
  const B = (p: number, j: number) => (tb ? b[j * bShape[1] + p] : b[p * bShape[1] + j]) as number;
  const out: number[] = [];
  for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) { let s = 0; for (let p = 0; p < k; p++) s += A(i, p) * B(p, j); out.push(s); }
  return out;
}

describe('WASM step kernels (BatchMatMul, Tanh, Identity)', () => {
  beforeAll(async () => { await initNodeBackend('wasm'); });
  afterAll(async () => { await initNodeBackend('wasm'); });

  it('are installed in place of the stock WASM kernels', () => {
    for (const name of ['BatchMatMul', 'Tanh', 'Identity', 'Concat']) {
      const kernel = tf.getKernel(name, 'wasm') as unknown as Record<symbol, unknown> | undefined;
      expect(kernel?.[Symbol.for('noisewright.stepKernel')]).toBe(true);
    }
  });

  it('matMul with every transpose combination agrees with float64 and with the CPU backend', async () => {
    const rand = lcg(3);
    for (const [m, k, n] of [[1, 1, 1], [7, 5, 3], [64, 40, 24], [33, 1, 17]] as const) {
      for (const ta of [false, true]) {
        for (const tb of [false, true]) {
          const aShape: [number, number] = ta ? [k, m] : [m, k];
          const bShape: [number, number] = tb ? [n, k] : [k, n];
          const a = Array.from({ length: m * k }, () => rand() * 4 - 2);
          const b = Array.from({ length: k * n }, () => rand() * 4 - 2);
          const run = () => tf.tidy(() => Array.from(tf.matMul(tf.tensor2d(a, aShape), tf.tensor2d(b, bShape), ta, tb).dataSync()));
          const wasm = await on('wasm', run);
          const cpu = await on('cpu', run);
          const ref = matMul64(a, aShape, b, bShape, ta, tb);
          // float32 sums of k products of size <= 4: tolerance 1e-5 * k (common practice, no source).
          ref.forEach((r, i) => {
            expect(Math.abs((wasm[i] as number) - r)).toBeLessThan(1e-5 * k + 1e-6);
            expect(Math.abs((wasm[i] as number) - (cpu[i] as number))).toBeLessThan(1e-5 * k + 1e-6);
          });
        }
      }
    }
  });

  it('batched matMul with transposes agrees with the CPU backend', async () => {
    const rand = lcg(5);
    const a = Array.from({ length: 3 * 4 * 6 }, () => rand() - 0.5);
    const b = Array.from({ length: 3 * 5 * 6 }, () => rand() - 0.5);
    const run = () => tf.tidy(() => Array.from(tf.matMul(tf.tensor3d(a, [3, 6, 4]), tf.tensor3d(b, [3, 5, 6]), true, true).dataSync()));
    const wasm = await on('wasm', run);
    const cpu = await on('cpu', run);
    expect(wasm.length).toBe(3 * 4 * 5);
    wasm.forEach((v, i) => expect(Math.abs(v - (cpu[i] as number))).toBeLessThan(1e-6));
  });

  it('tanh agrees with float64 Math.tanh (relative 3e-7 near 0, absolute 3e-7 elsewhere) and with the CPU backend', async () => {
    const xs: number[] = [0, -0, 1e-30, -1e-20, 1e-8, -3e-5, 0.01, -0.0624, 0.0625, 0.1, -0.5, 1, 2.5, -7, 9.5, 20, -60, 100];
    const rand = lcg(11);
    for (let i = 0; i < 4000; i++) xs.push((rand() * 2 - 1) * (rand() < 0.5 ? 0.2 : 12));
    const x32 = Float32Array.from(xs);
    const run = () => tf.tidy(() => Array.from(tf.tanh(tf.tensor1d(x32)).dataSync()));
    const wasm = await on('wasm', run);
    const cpu = await on('cpu', run);
    x32.forEach((x, i) => {
      const ref = Math.tanh(x);
      const w = wasm[i] as number;
      // float32 results: a few units in the last place (float32 epsilon 1.19e-7); common practice (no source).
      if (Math.abs(x) < 1 / 16) expect(Math.abs(w - ref)).toBeLessThanOrEqual(3e-7 * Math.abs(ref));
      else expect(Math.abs(w - ref)).toBeLessThan(3e-7);
      expect(Math.abs(w - (cpu[i] as number))).toBeLessThan(4e-7);
    });
  });

  it('tanh gradient is 1 - tanh^2 (float64 reference)', async () => {
    const xs = [-3, -0.3, -0.01, 0, 0.02, 0.7, 4];
    const g = await on('wasm', () => tf.tidy(() => Array.from(tf.grad((x: tf.Tensor) => tf.sum(tf.tanh(x)))(tf.tensor1d(xs)).dataSync())));
    xs.forEach((x, i) => expect(g[i]).toBeCloseTo(1 - Math.tanh(x) ** 2, 6));
  });

  it('concat along every axis, with short and long rows, each dtype, agrees exactly with the CPU backend', async () => {
    const rand = lcg(17);
    for (const dtype of ['float32', 'int32', 'bool'] as const) {
      for (const [shapes, axis] of [
        [[[4, 3], [4, 40], [4, 1]], 1], [[[2, 3], [5, 3]], 0], [[[2, 3, 4], [2, 3, 2], [2, 3, 0]], 2], [[[2, 1, 4], [2, 6, 4]], 1], [[[7], [0], [3]], 0],
      ] as Array<[number[][], number]>) {
        const data = shapes.map((s) => Array.from({ length: s.reduce((a, b) => a * b, 1) }, () => dtype === 'bool' ? (rand() < 0.5 ? 1 : 0) : Math.floor(rand() * 200 - 100) / (dtype === 'float32' ? 7 : 1)));
        const run = () => tf.tidy(() => {
          const out = tf.concat(shapes.map((s, i) => tf.tensor(data[i]!, s, dtype)), axis);
          return { shape: out.shape, values: Array.from(out.dataSync()) };
        });
        const wasm = await on('wasm', run);
        const cpu = await on('cpu', run);
        expect(wasm).toEqual(cpu);
      }
    }
  });

  it('a clone keeps its values after the original is disposed, and frees its memory when disposed', async () => {
    await on('wasm', () => {
      const before = tf.memory().numBytes;
      const a = tf.tensor1d([1, 2, 3]);
      const b = tf.clone(a);
      a.dispose();
      expect(Array.from(b.dataSync())).toEqual([1, 2, 3]);
      const c = tf.add(b, 1);
      expect(Array.from(c.dataSync())).toEqual([2, 3, 4]);
      b.dispose();
      c.dispose();
      expect(tf.memory().numBytes).toBe(before);
    });
  });
});
