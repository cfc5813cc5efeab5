import * as tf from '@tensorflow/tfjs-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { initNodeBackend } from '../node/tf-node';
import { copySlice } from './wasm-slice-kernels';

// Reference: TF.js's own CPU backend (@tensorflow/tfjs-backend-cpu 4.22.0 from the npm registry), whose Slice,
// Unpack and SplitV kernels are independent of the WASM backend's. Every case runs on both and must agree exactly.

/** Small deterministic generator for shapes and values (a 32-bit LCG, Numerical Recipes constants). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

type DType = 'float32' | 'int32' | 'bool';

function onBackend<T>(name: 'cpu' | 'wasm', f: () => T): T {
  tf.setBackend(name);
  return f();
}

async function both<T>(f: () => T): Promise<[T, T]> {
  await initNodeBackend('cpu');
  const cpu = onBackend('cpu', f);
  await initNodeBackend('wasm');
  // The comparison means nothing if the WASM backend silently fell back to the CPU one.
  expect(tf.getBackend()).toBe('wasm');
  const wasm = onBackend('wasm', f);
  return [cpu, wasm];
}

function values(n: number, dtype: DType, rand: () => number): number[] {
  return Array.from({ length: n }, () => (dtype === 'float32' ? rand() * 10 - 5 : dtype === 'int32' ? Math.floor(rand() * 1000) - 500 : rand() < 0.5 ? 1 : 0));
}

describe('view-based WASM Slice, Unpack and SplitV kernels', () => {
  beforeAll(async () => {
    await initNodeBackend('wasm');
  });
  afterAll(async () => {
    await initNodeBackend('wasm');
  });

  it('are installed in place of the stock WASM kernels', () => {
    expect(tf.getBackend()).toBe('wasm');
    for (const name of ['Slice', 'Unpack', 'SplitV']) {
      const kernel = tf.getKernel(name, 'wasm') as unknown as Record<symbol, unknown> | undefined;
      expect(kernel?.[Symbol.for('noisewright.viewSlice')]).toBe(true);
    }
  });

  it('slice like the CPU backend for ranks 1–5, contiguous or not, and each dtype', async () => {
    const rand = lcg(7);
    for (let trial = 0; trial < 60; trial++) {
      const rank = 1 + (trial % 5);
      const dtype = (['float32', 'int32', 'bool'] as const)[trial % 3] as DType;
      const shape = Array.from({ length: rank }, () => 1 + Math.floor(rand() * 5));
      const begin = shape.map((d) => Math.floor(rand() * d));
      const size = shape.map((d, i) => (rand() < 0.2 ? -1 : Math.floor(rand() * (d - (begin[i] as number) + 1))));
      const data = values(shape.reduce((a, b) => a * b, 1), dtype, rand);
      const [cpu, wasm] = await both(() => tf.tidy(() => {
        const out = tf.slice(tf.tensor(data, shape, dtype), begin, size);
        return { shape: out.shape, values: Array.from(out.dataSync()) };
      }));
      expect(wasm, `shape ${shape} begin ${begin} size ${size} ${dtype}`).toEqual(cpu);
    }
  });

  it('unstack and split like the CPU backend along every axis', async () => {
    const rand = lcg(11);
    const shape = [3, 4, 5];
    const data = values(60, 'float32', rand);
    for (const axis of [0, 1, 2, -1]) {
      const [cpu, wasm] = await both(() => tf.tidy(() => {
        const x = tf.tensor(data, shape);
        const pieces = tf.unstack(x, axis).map((t) => ({ shape: t.shape, values: Array.from(t.dataSync()) }));
        const size = x.shape.at(axis) as number;
        const parts = tf.split(x, [1, size - 1], axis).map((t) => ({ shape: t.shape, values: Array.from(t.dataSync()) }));
        return { pieces, parts };
      }));
      expect(wasm).toEqual(cpu);
    }
  });

  it('give the same gradients as the CPU backend through slice, unstack and split', async () => {
    const rand = lcg(3);
    const data = values(2 * 6 * 4, 'float32', rand);
    const [cpu, wasm] = await both(() => tf.tidy(() => {
      const f = (x: tf.Tensor) => {
        const [a, b] = tf.split(x, [2, 4], 1) as [tf.Tensor, tf.Tensor];
        const rows = tf.unstack(b, 0);
        return tf.sum(tf.mul(tf.slice(a, [0, 1, 1], [2, 1, 2]), 3)).add(tf.sum(tf.square(rows[1] as tf.Tensor)));
      };
      return Array.from(tf.grad(f)(tf.tensor(data, [2, 6, 4])).dataSync());
    }));
    expect(wasm.length).toBe(48);
    for (let i = 0; i < wasm.length; i++) expect(wasm[i]).toBeCloseTo(cpu[i] as number, 5);
  });

  it('leave string tensors to the stock kernel', async () => {
    const [cpu, wasm] = await both(() => tf.tidy(() => {
      const s = tf.tensor(['ka', 'lo', 'mi', 'nu'], [2, 2], 'string');
      return { slice: tf.slice(s, [1, 0], [1, 2]).arraySync(), pieces: tf.unstack(s, 1).map((t) => t.arraySync()) };
    }));
    expect(wasm).toEqual(cpu);
    expect(wasm.slice).toEqual([['mi', 'nu']]);
  });

  it('copySlice copies the expected rows of a row-major 3-d array (worked by hand)', () => {
    // x[i][j][k] = 100 i + 10 j + k with shape [2, 3, 4]; the slice begin [1, 1, 2], size [1, 2, 2] holds
    // x[1][1][2..3] = 112, 113 and x[1][2][2..3] = 122, 123.
    const src = new Float32Array(24).map((_, n) => 100 * Math.floor(n / 12) + 10 * (Math.floor(n / 4) % 3) + (n % 4));
    const dst = new Float32Array(4);
    copySlice(src, [2, 3, 4], [1, 1, 2], [1, 2, 2], dst);
    expect(Array.from(dst)).toEqual([112, 113, 122, 123]);
  });
});
