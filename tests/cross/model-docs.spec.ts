/**
 * The written math matches the code: a reader who has only docs/MODEL.md and shared/model/CHECKPOINT-FORMAT.md
 * re-implements the flows (parameter names, output order, tril entry order, coupling mask with odd d), the
 * encoder's GRU, the GRU baseline (learned h0, gate order, tanh observation layer) in plain float64 JavaScript
 * from the weights a checkpoint would hold, and gets the model code's numbers; and the tensor tables list exactly
 * the tensors the code creates. The reference numbers here are the documents' formulas, not the model code.
 */
import { readFileSync } from 'node:fs';
import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet, encodeBatch } from '../../shared/data/encode';
import { createRng } from '../../shared/data/random';
import { initNodeBackend } from '../../shared/node/tf-node';
import { createFlow, type FlowSpec } from '../../shared/model/flows/flow';
import { backwardGruSequence } from '../../shared/model/gru-sequence';
import { GruLanguageModel, gruSpecs } from '../../shared/model/gru-lm';
import type { NamedWeights } from '../../shared/model/params';
import { ssmParamSpecs } from '../../shared/model/ssm-settings';

beforeAll(async () => {
  await initNodeBackend();
});

const MODEL_DOC = readFileSync(new URL('../../docs/MODEL.md', import.meta.url), 'utf8');
const FORMAT_DOC = readFileSync(new URL('../../shared/model/CHECKPOINT-FORMAT.md', import.meta.url), 'utf8');

type Mat = number[][];
/** A `[rows, cols]` tensor of a checkpoint as a row-major matrix (CHECKPOINT-FORMAT.md: matrices are `[in, out]`). */
const mat = (w: NamedWeights, name: string): Mat => {
  const t = w[name];
  if (!t) throw new Error(`no tensor ${name}`);
  const [r, c] = t.shape as [number, number];
  return Array.from({ length: r }, (_, i) => Array.from(t.values.subarray(i * c, i * c + c)));
};
const vec = (w: NamedWeights, name: string): number[] => Array.from(w[name]!.values);
/** `x W + b` (row vectors, MODEL.md section 2). */
const affine = (x: number[], W: Mat, b: number[]): number[] => b.map((bj, j) => bj + x.reduce((s, xi, i) => s + xi * W[i]![j]!, 0));
const tanh = (v: number[]) => v.map(Math.tanh);
const sigmoid = (v: number[]) => v.map((x) => 1 / (1 + Math.exp(-x)));
const softplus = (x: number) => Math.log1p(Math.exp(x));
/** `net(x) = tanh(x W1 + b1) W2 + b2` with parameters `<prefix>w1, b1, w2, b2` (MODEL.md section 3). */
const net = (w: NamedWeights, p: string, x: number[]) => affine(tanh(affine(x, mat(w, `${p}w1`), vec(w, `${p}b1`))), mat(w, `${p}w2`), vec(w, `${p}b2`));

/** Every weight replaced by a random draw (so unused entries and initial values cannot hide a mismatch). */
function randomised(w: NamedWeights, seed: string, scale = 0.6): NamedWeights {
  const rng = createRng(seed);
  return Object.fromEntries(Object.entries(w).map(([k, t]) => [k, { shape: t.shape, values: Float32Array.from(t.values, () => scale * rng.normal()) }]));
}

/** One flow layer forward, from MODEL.md section 3 only. Returns y and log |det dy/dz|. */
function docLayer(kind: FlowSpec['kind'], w: NamedWeights, p: string, c: number[], z: number[], couplingIndex: number): { y: number[]; logdet: number } {
  const d = z.length;
  const scale = (raw: number) => softplus(raw) + 1e-4;
  if (kind === 'shift') {
    const mu = net(w, `${p}mu.`, c);
    return { y: z.map((zi, i) => zi + mu[i]!), logdet: 0 };
  }
  if (kind === 'diag') {
    const out = net(w, `${p}net.`, c); // [mu (d) | raw (d)]
    const sigma = out.slice(d, 2 * d).map(scale);
    return { y: z.map((zi, i) => out[i]! + sigma[i]! * zi), logdet: sigma.reduce((s, x) => s + Math.log(x), 0) };
  }
  if (kind === 'tril') {
    const out = net(w, `${p}net.`, c); // [mu | raw | l row by row: (1,0), (2,0), (2,1), ...]
    const sigma = out.slice(d, 2 * d).map(scale);
    const L: Mat = Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? sigma[i]! : 0)));
    let k = 2 * d;
    for (let i = 1; i < d; i++) for (let j = 0; j < i; j++) L[i]![j] = out[k++]!;
    return { y: z.map((_, i) => out[i]! + L[i]!.reduce((s, lij, j) => s + lij * z[j]!, 0)), logdet: sigma.reduce((s, x) => s + Math.log(x), 0) };
  }
  // coupling: the k-th coupling layer keeps i < floor(d/2) when k is even, i >= floor(d/2) when odd.
  const half = Math.floor(d / 2);
  const m = z.map((_, i) => ((i < half) === (couplingIndex % 2 === 0) ? 1 : 0));
  const out = net(w, `${p}net.`, [...z.map((zi, i) => m[i]! * zi), ...c]); // input [m*z, c], output [s_raw | t]
  const sc = vec(w, `${p}scale`);
  const s = z.map((_, i) => Math.tanh(out[i]!) * sc[i]!);
  const t = z.map((_, i) => out[d + i]!);
  return { y: z.map((zi, i) => m[i]! * zi + (1 - m[i]!) * (zi * Math.exp(s[i]!) + t[i]!)), logdet: s.reduce((a, si, i) => a + (1 - m[i]!) * si, 0) };
}

describe('docs/MODEL.md against the model code', () => {
  // d = 3: odd, so the coupling halves differ in size; d = 4: the first size where row-by-row and column-by-column
  // orders of the tril entries differ.
  it.each([3, 4])('re-implements a flow stack (every kind, two coupling layers) from the doc alone, d = %i', (d) => {
    const spec: FlowSpec[] = [{ kind: 'coupling' }, { kind: 'tril' }, { kind: 'coupling' }, { kind: 'diag' }, { kind: 'shift' }];
    const flow = createFlow(spec, d, d, 4, createRng('doc-flow'));
    const w = randomised(flow.getWeights(), 'doc-flow-weights');
    flow.setWeights(w);
    const rng = createRng('doc-flow-inputs');
    const rows = Array.from({ length: 4 }, () => ({ c: Array.from({ length: d }, () => rng.normal()), z: Array.from({ length: d }, () => rng.normal()) }));
    const got = tf.tidy(() => {
      const r = flow.forward(tf.tensor2d(rows.map((x) => x.c)), tf.tensor2d(rows.map((x) => x.z)));
      return { y: r.y.arraySync() as number[][], logdet: r.logdet.arraySync() as number[] };
    });
    rows.forEach(({ c, z }, n) => {
      let y = z;
      let logdet = 0;
      let couplings = 0;
      spec.forEach((layer, i) => {
        const r = docLayer(layer.kind, w, `${i}.${layer.kind}.`, c, y, layer.kind === 'coupling' ? couplings++ : 0);
        y = r.y;
        logdet += r.logdet;
      });
      y.forEach((v, i) => expect(got.y[n]![i]).toBeCloseTo(v, 4));
      expect(got.logdet[n]).toBeCloseTo(logdet, 4);
    });
    flow.dispose();
  });

  it('re-implements the encoder GRU (two biases, reset | update | candidate, backwards, padding unchanged)', () => {
    const E = 2;
    const H = 3;
    const rng = createRng('doc-encoder');
    const r = (n: number) => Array.from({ length: n }, () => 0.7 * rng.normal());
    const Wx: Mat = Array.from({ length: E }, () => r(3 * H));
    const bx = r(3 * H);
    const Wh: Mat = Array.from({ length: H }, () => r(3 * H));
    const bh = r(3 * H);
    // Two words of 3 and 1 characters (+ EOW): T = 4 and 2, padded to 4.
    const T = 4;
    const xs: Mat[] = [Array.from({ length: T }, () => r(E)), Array.from({ length: T }, () => r(E))];
    const lengths = [4, 2];
    const got = tf.tidy(() => {
      const xProj = tf.tensor3d(Array.from({ length: T }, (_, t) => xs.map((x) => affine(x[t]!, Wx, bx))));
      const mask = tf.tensor3d(Array.from({ length: T }, (_, t) => lengths.map((n) => [t < n ? 1 : 0])));
      return backwardGruSequence(xProj, mask, tf.tensor2d(Wh), tf.tensor1d(bh)).arraySync() as number[][][];
    });
    xs.forEach((x, b) => {
      let state = new Array<number>(H).fill(0); // b_{T+1} = 0
      for (let t = T - 1; t >= 0; t--) {
        if (t < lengths[b]!) {
          const xp = affine(x[t]!, Wx, bx);
          const hp = affine(state, Wh, bh);
          const rg = sigmoid(xp.slice(0, H).map((v, i) => v + hp[i]!));
          const u = sigmoid(xp.slice(H, 2 * H).map((v, i) => v + hp[H + i]!));
          const n = tanh(xp.slice(2 * H).map((v, i) => v + rg[i]! * hp[2 * H + i]!));
          state = n.map((ni, i) => (1 - u[i]!) * ni + u[i]! * state[i]!);
        }
        state.forEach((v, i) => expect(got[t]![b]![i]).toBeCloseTo(v, 5));
      }
    });
  });

  it('re-implements the GRU baseline (learned h0, z | r | candidate, one bias, tanh observation layer)', () => {
    const words = ['abca', 'b', 'cab'];
    const alphabet = buildAlphabet(words);
    const settings = { vocabSize: alphabet.size, stateSize: 3, embeddingSize: 2, observationHidden: 2 };
    const model = new GruLanguageModel(settings, 'doc-gru');
    const w = randomised(model.getWeights(), 'doc-gru-weights');
    model.setWeights(w);
    const batch = encodeBatch(words, alphabet);
    const got = tf.tidy(() => Array.from(model.logLikelihood(batch).dataSync()));
    const d = settings.stateSize;
    const emb = mat(w, 'emb');
    words.forEach((_, b) => {
      let h = vec(w, 'h0');
      let prev = 0; // w_0 = EOW
      let logp = 0;
      for (let t = 0; t < batch.lengths[b]!; t++) {
        const x = affine(emb[prev]!, mat(w, 'Wx'), vec(w, 'bx')); // [xz | xr | xh]
        const hzr = affine(h, mat(w, 'Uzr'), new Array<number>(2 * d).fill(0)); // no recurrent bias
        const z = sigmoid(x.slice(0, d).map((v, i) => v + hzr[i]!));
        const rg = sigmoid(x.slice(d, 2 * d).map((v, i) => v + hzr[d + i]!));
        const n = tanh(affine(h.map((hi, i) => rg[i]! * hi), mat(w, 'Uh'), x.slice(2 * d)));
        h = h.map((hi, i) => z[i]! * hi + (1 - z[i]!) * n[i]!);
        const logits = affine(tanh(affine(h, mat(w, 'Wm'), vec(w, 'bm'))), mat(w, 'Wo'), vec(w, 'bo'));
        const top = Math.max(...logits);
        const lse = top + Math.log(logits.reduce((s, v) => s + Math.exp(v - top), 0));
        const id = batch.ids[b * batch.maxLen + t]!;
        logp += logits[id]! - lse;
        prev = id;
      }
      expect(got[b]).toBeCloseTo(logp, 4);
    });
    model.dispose();
  });

  it('states the scale rule and the coupling mask the code uses', () => {
    expect(MODEL_DOC).toContain('softplus(raw) + 1e-4');
    expect(MODEL_DOC).toMatch(/never `exp`/);
    expect(MODEL_DOC).toContain('(1,0), (2,0), (2,1)');
    expect(MODEL_DOC).toContain('reset | update | candidate');
    expect(MODEL_DOC).toContain('z | r | candidate');
    expect(MODEL_DOC).toMatch(/ratio of sums/);
  });
});

describe('CHECKPOINT-FORMAT.md against the model code', () => {
  /** The tensor tables of the document, evaluated for one set of sizes (names and shapes as the tables give them). */
  it('lists exactly the tensors of a state-space model and a GRU, with their shapes', () => {
    const [d, V, E, H, P, F, O] = [3, 6, 4, 5, 7, 2, 0];
    const settings = {
      stateSize: d, vocabSize: V, embeddingSize: E, encoderSize: H, proposalHidden: P, flowHidden: F, observationHidden: O,
      generativeFlow: [{ kind: 'coupling' as const }, { kind: 'tril' as const }, { kind: 'shift' as const }], inferenceFlow: [{ kind: 'diag' as const }],
    };
    const expected: Record<string, number[]> = {
      h0: [d], 'obs.w': [d, V], 'obs.b': [V], 'enc.embed': [V, E],
      'enc.wx': [E, 3 * H], 'enc.bx': [3 * H], 'enc.wh': [H, 3 * H], 'enc.bh': [3 * H],
      'prop.wh': [d, P], 'prop.wb': [H, P], 'prop.b1': [P], 'prop.w2': [P, 2 * d], 'prop.b2': [2 * d],
      'gen/0.coupling.net.w1': [2 * d, F], 'gen/0.coupling.net.b1': [F], 'gen/0.coupling.net.w2': [F, 2 * d], 'gen/0.coupling.net.b2': [2 * d], 'gen/0.coupling.scale': [d],
      'gen/1.tril.net.w1': [d, F], 'gen/1.tril.net.b1': [F], 'gen/1.tril.net.w2': [F, 2 * d + (d * (d - 1)) / 2], 'gen/1.tril.net.b2': [2 * d + (d * (d - 1)) / 2],
      'gen/2.shift.mu.w1': [d, F], 'gen/2.shift.mu.b1': [F], 'gen/2.shift.mu.w2': [F, d], 'gen/2.shift.mu.b2': [d],
      'inf/0.diag.net.w1': [d, F], 'inf/0.diag.net.b1': [F], 'inf/0.diag.net.w2': [F, 2 * d], 'inf/0.diag.net.b2': [2 * d],
    };
    const specs = ssmParamSpecs(settings);
    expect(Object.fromEntries(Object.entries(specs).map(([k, s]) => [k, s.shape]))).toEqual(expected);
    // Output order [mean | raw scale] with the raw bias at log(e − 1) (scale 1 at start), as the documents say.
    const raw1 = Math.log(Math.E - 1);
    const initOf = (name: string) => (specs[name]!.init as { kind: string; values?: number[] }).values;
    expect(initOf('prop.b2')).toEqual([0, 0, 0, raw1, raw1, raw1]);
    expect(initOf('inf/0.diag.net.b2')).toEqual([0, 0, 0, raw1, raw1, raw1]);
    expect(initOf('gen/1.tril.net.b2')).toEqual([0, 0, 0, raw1, raw1, raw1, 0, 0, 0]);
    // The coupling scale starts at 1 and the learned h0 at 0.
    expect(specs['gen/0.coupling.scale']!.init).toEqual({ kind: 'const', value: 1 });
    expect(specs['h0']!.init).toEqual({ kind: 'const', value: 0 });
    // With an observation MLP (O > 0) the linear layer gives way to obs.w1/b1/w2/b2.
    const mlp = ssmParamSpecs({ ...settings, observationHidden: 2 });
    expect(Object.keys(mlp).filter((k) => k.startsWith('obs.')).sort()).toEqual(['obs.b1', 'obs.b2', 'obs.w1', 'obs.w2']);
    expect(mlp['obs.w2']!.shape).toEqual([2, V]);

    const gru = gruSpecs({ vocabSize: V, stateSize: d, embeddingSize: E, observationHidden: 2 });
    expect(Object.fromEntries(Object.entries(gru).map(([k, s]) => [k, s.shape]))).toEqual({
      emb: [V, E], h0: [d], Wx: [E, 3 * d], bx: [3 * d], Uzr: [d, 2 * d], Uh: [d, d], Wo: [2, V], bo: [V], Wm: [d, 2], bm: [2],
    });
    // Every name above is written in the document.
    for (const name of [...Object.keys(expected).filter((k) => !k.includes('/')), 'obs.w1', 'obs.w2', ...Object.keys(gru)]) {
      expect(FORMAT_DOC).toContain(`\`${name}\``);
    }
    for (const p of ['mu.w1', 'net.w1', 'net.w2', 'scale']) expect(FORMAT_DOC).toContain(`\`${p}`);
  });
});
