import * as tf from '@tensorflow/tfjs-core';
import { determinant, Matrix } from 'ml-matrix';
import { beforeAll, describe, expect, it } from 'vitest';
import { createRng } from '../../data/random';
import { initNodeBackend } from '../../node/tf-node';
import { couplingMask } from './coupling-flow';
import { createFlow, flowParamSpecs, validateFlowSpec, type ConditionalFlow, type FlowSpec } from './flow';

beforeAll(async () => {
  await initNodeBackend();
});

const DIM = 4;
const CTX = 3;
const HIDDEN = 5;
const ROWS = 3;

const CASES: Record<string, FlowSpec[]> = {
  shift: [{ kind: 'shift' }],
  diag: [{ kind: 'diag' }],
  tril: [{ kind: 'tril' }],
  coupling: [{ kind: 'coupling' }],
  'coupling x3 + diag': [{ kind: 'coupling' }, { kind: 'coupling' }, { kind: 'coupling' }, { kind: 'diag' }],
  'tril + shift + coupling': [{ kind: 'tril' }, { kind: 'shift' }, { kind: 'coupling' }],
};

/** A flow whose every weight (biases and scales included) is random, so no zero hides a bug. */
function randomFlow(spec: FlowSpec[], seed: string, dim = DIM): ConditionalFlow {
  const flow = createFlow(spec, dim, CTX, HIDDEN, createRng(seed));
  const rng = createRng(`${seed}/weights`);
  const w = flow.getWeights();
  for (const t of Object.values(w)) for (let i = 0; i < t.values.length; i++) t.values[i] = 0.6 * rng.normal();
  flow.setWeights(w);
  return flow;
}

function randomMatrix(rows: number, cols: number, seed: string): tf.Tensor2D {
  const rng = createRng(seed);
  return tf.tensor2d(Array.from({ length: rows * cols }, () => rng.normal()), [rows, cols]);
}

/** Jacobian dy/dz per row by automatic differentiation (one gradient per output dimension). */
function jacobians(flow: ConditionalFlow, c: tf.Tensor2D, z: tf.Tensor2D, inverse: boolean): number[][][] {
  const d = z.shape[1];
  const rows: number[][][] = Array.from({ length: z.shape[0] }, () => []);
  for (let i = 0; i < d; i++) {
    const g = tf.tidy(() =>
      tf.grad((x: tf.Tensor) => {
        const out = inverse ? flow.inverse(c, x as tf.Tensor2D).z : flow.forward(c, x as tf.Tensor2D).y;
        return tf.sum(tf.slice(out, [0, i], [-1, 1]));
      })(z),
    );
    const values = g.arraySync() as number[][];
    g.dispose();
    values.forEach((row, n) => (rows[n] as number[][]).push(row));
  }
  return rows;
}

describe.each(Object.entries(CASES))('flow %s', (label, spec) => {
  it('inverse(forward(z)) recovers z and forward(inverse(y)) recovers y', () => {
    const flow = randomFlow(spec, `roundtrip/${label}`);
    tf.tidy(() => {
      const c = randomMatrix(ROWS, CTX, 'c');
      const z = randomMatrix(ROWS, DIM, 'z');
      const back = flow.inverse(c, flow.forward(c, z).y).z;
      // Tolerance: float32 arithmetic, common practice (no source).
      expect(tf.max(tf.abs(tf.sub(back, z))).dataSync()[0]).toBeLessThan(1e-4);
      const again = flow.forward(c, flow.inverse(c, z).z).y;
      expect(tf.max(tf.abs(tf.sub(again, z))).dataSync()[0]).toBeLessThan(1e-4);
    });
    flow.dispose();
  });

  it('log-determinant equals log|det J| of the autodiff Jacobian (ml-matrix determinant), forward and inverse', () => {
    const flow = randomFlow(spec, `jacobian/${label}`);
    const c = randomMatrix(ROWS, CTX, 'c2');
    const z = randomMatrix(ROWS, DIM, 'z2');
    const fwd = flow.forward(c, z);
    const inv = flow.inverse(c, fwd.y);
    const jf = jacobians(flow, c, z, false);
    const ji = jacobians(flow, c, fwd.y, true);
    const ldf = fwd.logdet.arraySync();
    const ldi = inv.logdet.arraySync();
    for (let n = 0; n < ROWS; n++) {
      // Reference: determinant from the ml-matrix library (npm) of the Jacobian from TF.js autodiff.
      const refF = Math.log(Math.abs(determinant(new Matrix(jf[n] as number[][]))));
      const refI = Math.log(Math.abs(determinant(new Matrix(ji[n] as number[][]))));
      expect(ldf[n]).toBeCloseTo(refF, 3);
      expect(ldi[n]).toBeCloseTo(refI, 3);
      // Closed form: the inverse map's log-determinant is minus the forward one.
      expect((ldi[n] as number) + (ldf[n] as number)).toBeCloseTo(0, 4);
    }
    tf.dispose([c, z, fwd.y, fwd.logdet, inv.z, inv.logdet]);
    flow.dispose();
  });
});

describe.each([
  ['coupling x2, odd size 5', [{ kind: 'coupling' }, { kind: 'coupling' }] as FlowSpec[], 5],
  ['tril, size 1 (no lower entries)', [{ kind: 'tril' }] as FlowSpec[], 1],
  ['coupling + diag, size 1', [{ kind: 'coupling' }, { kind: 'diag' }] as FlowSpec[], 1],
])('flow %s', (label, spec, dim) => {
  it('inverts and has the log-determinant of its autodiff Jacobian (ml-matrix determinant)', () => {
    const flow = randomFlow(spec, `sizes/${label}`, dim);
    const c = randomMatrix(ROWS, CTX, 'c5');
    const z = randomMatrix(ROWS, dim, 'z5');
    const fwd = flow.forward(c, z);
    const back = flow.inverse(c, fwd.y);
    expect(tf.tidy(() => tf.max(tf.abs(tf.sub(back.z, z))).dataSync()[0])).toBeLessThan(1e-4);
    const jf = jacobians(flow, c, z, false);
    const ldf = fwd.logdet.arraySync();
    jf.forEach((j, n) => expect(ldf[n]).toBeCloseTo(Math.log(Math.abs(determinant(new Matrix(j)))), 3));
    tf.dispose([c, z, fwd.y, fwd.logdet, back.z, back.logdet]);
    flow.dispose();
  });
});

describe('flow construction', () => {
  it('the triangular flow really couples dimensions (its Jacobian is lower-triangular, not diagonal)', () => {
    const flow = randomFlow([{ kind: 'tril' }], 'tril-structure');
    const c = randomMatrix(1, CTX, 'c3');
    const z = randomMatrix(1, DIM, 'z3');
    const j = (jacobians(flow, c, z, false)[0] as number[][]);
    for (let i = 0; i < DIM; i++) {
      for (let k = i + 1; k < DIM; k++) expect(j[i]?.[k]).toBe(0);
      expect(Math.abs(j[i]?.[i] ?? 0)).toBeGreaterThan(0);
    }
    expect(Math.abs(j[DIM - 1]?.[0] ?? 0)).toBeGreaterThan(1e-3);
    tf.dispose([c, z]);
    flow.dispose();
  });

  it('coupling masks alternate halves from one layer to the next', () => {
    expect(Array.from(couplingMask(4, 0))).toEqual([1, 1, 0, 0]);
    expect(Array.from(couplingMask(4, 1))).toEqual([0, 0, 1, 1]);
    expect(Array.from(couplingMask(5, 0))).toEqual([1, 1, 0, 0, 0]);
  });

  it('counts parameters as the layer formulas say', () => {
    // Closed form from MODEL.md section 3: a conditioner in -> hidden -> out has in*h + h + h*out + out weights.
    const mlp = (i: number, h: number, o: number) => i * h + h + h * o + o;
    const d = DIM;
    const specs = flowParamSpecs([{ kind: 'shift' }, { kind: 'diag' }, { kind: 'tril' }, { kind: 'coupling' }], {
      dim: d,
      ctxDim: CTX,
      hidden: HIDDEN,
    });
    const count = Object.values(specs).reduce((n, s) => n + s.shape.reduce((a, b) => a * b, 1), 0);
    const expected =
      mlp(CTX, HIDDEN, d) + mlp(CTX, HIDDEN, 2 * d) + mlp(CTX, HIDDEN, 2 * d + (d * (d - 1)) / 2) + mlp(d + CTX, HIDDEN, 2 * d) + d;
    expect(count).toBe(expected);
  });

  it('rejects an unknown or empty flow with a message that says what to use', () => {
    expect(() => validateFlowSpec([], 'generative flow')).toThrow(/at least one layer/);
    expect(() => validateFlowSpec([{ kind: 'spline' }], 'generative flow')).toThrow(/shift, diag, tril, coupling/);
    expect(() => createFlow([{ kind: 'diag' }], 0, 3, 4, createRng(1))).toThrow(/positive integer/);
  });

  it('does not leak tensors in forward or inverse', () => {
    const flow = randomFlow(CASES['tril + shift + coupling'] as FlowSpec[], 'leak');
    const c = randomMatrix(ROWS, CTX, 'c4');
    const z = randomMatrix(ROWS, DIM, 'z4');
    // No tf.tidy around the calls (it would clean up a leak before the count): only the results are disposed.
    const before = tf.memory().numTensors;
    const fwd = flow.forward(c, z);
    const inv = flow.inverse(c, fwd.y);
    expect(tf.memory().numTensors).toBe(before + 4);
    tf.dispose([fwd.y, fwd.logdet, inv.z, inv.logdet]);
    expect(tf.memory().numTensors).toBe(before);
    tf.dispose([c, z]);
    flow.dispose();
  });
});
