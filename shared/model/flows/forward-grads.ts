/**
 * The forward pass of each flow layer (y = f(c, z), MODEL.md section 3) step by step with a hand-written
 * backward pass, for the inference recurrence (`ssm-recurrence.ts`). Same equations and evaluation order as the
 * layers' own `forward`; what the stepper adds is bookkeeping: it keeps what the backward pass needs per step,
 * stacked over steps, so that coefficients are computed once for all steps and each weight's gradient is one
 * matmul over all steps. The log-determinant is taken after the loop from the stacks.
 *
 * Notation per step (a = tanh(ctxPre) unless said otherwise, out = a W2 + b2, dy = gradient reaching y,
 * dl = gradient reaching the row's log-det, [N, 1]); softplus' = sigmoid:
 * - shift:    y = z + out.                      dz = dy; d out = dy.
 * - diag:     [mu, p] = out, s = softplus(p) + 1e-4, y = mu + s z, logdet = sum log s.
 *             dz = dy s; d mu = dy; d p = (dy z + dl / s) sigmoid(p).
 * - tril:     [mu, p, l] = out, y = mu + s z + (l * (z Pick)) Add, logdet = sum log s.
 *             as diag, plus e = dy Add^T: d l = e * (z Pick); dz += (e * l) Pick^T.
 * - coupling: a = tanh(z W1z + ctxPre), [r, t] = out, th = tanh(r), s = th scale, E = exp(s), y = z E + t,
 *             logdet = sum s.  d s = dy z E + dl; d r = d s scale (1 - th^2); d t = dy; d scale = sum d s th;
 *             d pre = (d out W2^T)(1 - a^2); dz = dy E + d pre W1z^T.
 * For every kind: d ctxPre = (d out W2^T)(1 - a^2); d W2 = sum_t a^T d out; d b2 = sum_t d out.
 * Checked against automatic differentiation in `ssm-recurrence.spec.ts`.
 */
import * as tf from '@tensorflow/tfjs-core';
import { columnSums } from '../bias-add';
import { boundedScale } from './conditioner';
import type { ForwardParts } from './flow-layer';

/** Runs one layer forward step by step and keeps what its backward pass needs. */
export interface ForwardStepper {
  /** `activated`: tanh(ctxPre) when the caller has it already (not for coupling layers, whose tanh sees z too). */
  forward(ctxPre: tf.Tensor2D, z: tf.Tensor2D, activated?: tf.Tensor2D): tf.Tensor2D;
  /** The kept tensors stacked over the steps so far, [T, N, .] each (call once, after the loop; frees the per-step ones). */
  stacks(): tf.Tensor3D[];
}

/** The backward pass of one layer over all steps (call `step` for t = T-1 down to 0). */
export interface LayerBackward {
  /** Gradients reaching z (null when not asked for: see `layerBackward`) and ctxPre at step t, given the gradient reaching y ([N, d]). */
  step(t: number, dy: tf.Tensor2D): { dz: tf.Tensor2D | null; dCtx: tf.Tensor2D };
  /** Gradients of `parts.weights` (same order and shapes), from all steps at once. */
  weightGrads(): tf.Tensor[];
}

/** Number of stacks a layer of this kind keeps (the layout `stacks()` returns). */
export function stackCount(parts: ForwardParts): number {
  return { shift: 1, diag: 4, tril: parts.constants ? 6 : 4, coupling: 4 }[parts.kind];
}

/** A stepper for one layer, computing with `weights` (the layer's `parts.weights` or stand-ins of the same shapes). */
export function forwardStepper(parts: ForwardParts, weights: tf.Tensor[]): ForwardStepper {
  const kept: tf.Tensor2D[][] = Array.from({ length: stackCount(parts) }, () => []);
  const keep = (...ts: tf.Tensor2D[]) => ts.forEach((t, i) => kept[i]?.push(t));
  const stacks = () => {
    const out = kept.map((list) => tf.stack(list) as tf.Tensor3D);
    tf.dispose(kept.flat()); // per-step intermediates of this layer only (never an input of the op)
    return out;
  };
  const d = parts.dim;
  if (parts.kind === 'coupling') {
    const [wz, w2, b2, scale] = weights as [tf.Tensor2D, tf.Tensor2D, tf.Tensor1D, tf.Tensor1D];
    return {
      forward(ctxPre, z) {
        const a = tf.tanh(tf.add(tf.matMul(z, wz), ctxPre)) as tf.Tensor2D;
        const [r, t] = tf.split(tf.add(tf.matMul(a, w2), b2), 2, 1) as [tf.Tensor2D, tf.Tensor2D];
        const th = tf.tanh(r) as tf.Tensor2D;
        const e = tf.exp(tf.mul(th, scale)) as tf.Tensor2D;
        keep(z, a, th, e);
        return tf.add(tf.mul(z, e), t) as tf.Tensor2D;
      },
      stacks,
    };
  }
  const [w2, b2] = weights as [tf.Tensor2D, tf.Tensor1D];
  return {
    forward(ctxPre, z, activated) {
      const a = activated ?? (tf.tanh(ctxPre) as tf.Tensor2D);
      const out = tf.add(tf.matMul(a, w2), b2) as tf.Tensor2D;
      if (parts.kind === 'shift') {
        keep(a);
        return tf.add(z, out) as tf.Tensor2D;
      }
      const lowerCount = out.shape[1] - 2 * d;
      const [mu, p, lower] = tf.split(out, lowerCount > 0 ? [d, d, lowerCount] : [d, d], 1) as tf.Tensor2D[];
      const s = boundedScale(p as tf.Tensor2D) as tf.Tensor2D;
      const y = tf.add(mu as tf.Tensor2D, tf.mul(s, z)) as tf.Tensor2D;
      if (parts.kind === 'tril' && parts.constants && lower) {
        const [pick, add] = parts.constants as [tf.Tensor2D, tf.Tensor2D];
        const zp = tf.matMul(z, pick);
        keep(a, p as tf.Tensor2D, s, z, lower, zp as tf.Tensor2D);
        return tf.add(y, tf.matMul(tf.mul(lower, zp), add)) as tf.Tensor2D;
      }
      keep(a, p as tf.Tensor2D, s, z);
      return y;
    },
    stacks,
  };
}

/** log |det dy/dz| of every step, [T, N], from the stacks (null for a shift layer: 0). */
export function stackedLogdet(parts: ForwardParts, weights: tf.Tensor[], stacks: tf.Tensor3D[]): tf.Tensor2D | null {
  if (parts.kind === 'shift') return null;
  if (parts.kind === 'coupling') return tf.sum(tf.mul(stacks[2] as tf.Tensor3D, weights[3] as tf.Tensor1D), 2) as tf.Tensor2D;
  return tf.sum(tf.log(stacks[2] as tf.Tensor3D), 2) as tf.Tensor2D;
}

const rows = (t: tf.Tensor): tf.Tensor2D => tf.reshape(t, [-1, t.shape[t.shape.length - 1] as number]) as tf.Tensor2D;
/** 1 - x^2 (the derivative of tanh from its value). */
const tanhSlope = (x: tf.Tensor): tf.Tensor => tf.sub(1, tf.square(x));

/** `sum_t a_t^T g_t` and `sum_t g_t` for the second layer of a conditioner: [A stack, list of g per step]. */
function outputLayerGrads(a: tf.Tensor3D, gs: tf.Tensor2D[]): tf.Tensor[] {
  const g = rows(tf.stack(gs));
  return [tf.matMul(rows(a), g, true, false), columnSums(g)];
}

/**
 * The backward pass of a layer from its stacks (the forward's `stacks()`), the weights it ran with and the
 * gradient reaching its log-det at every step, `dL` [T, N, 1] (known before the loop: terms in dl are taken
 * for all steps at once). `inputGrad` false (diag and tril): z needs no gradient — the proposal, a diag layer on
 * the noise — and dz is skipped (null).
 */
export function layerBackward(parts: ForwardParts, weights: tf.Tensor[], stacks: tf.Tensor3D[], dL: tf.Tensor3D, inputGrad = true): LayerBackward {
  const T = stacks[0]?.shape[0] as number;
  const dOuts: tf.Tensor2D[] = new Array(T);
  if (parts.kind === 'coupling') {
    const [wz, w2, , scale] = weights as [tf.Tensor2D, tf.Tensor2D, tf.Tensor1D, tf.Tensor1D];
    const [Z, A, TH, E] = stacks as [tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor3D];
    const ze = tf.unstack(tf.mul(Z, E)) as tf.Tensor2D[];
    const cs = tf.unstack(tf.mul(tanhSlope(TH), scale)) as tf.Tensor2D[];
    const ca = tf.unstack(tanhSlope(A)) as tf.Tensor2D[];
    const es = tf.unstack(E) as tf.Tensor2D[];
    const dls = tf.unstack(dL) as tf.Tensor2D[];
    const [w2T, wzT] = [tf.transpose(w2), tf.transpose(wz)];
    const dss: tf.Tensor2D[] = new Array(T);
    const dPres: tf.Tensor2D[] = new Array(T);
    return {
      step(t, dy) {
        const ds = tf.add(tf.mul(dy, ze[t] as tf.Tensor2D), dls[t] as tf.Tensor2D) as tf.Tensor2D;
        const dOut = tf.concat([tf.mul(ds, cs[t] as tf.Tensor2D), dy], 1) as tf.Tensor2D;
        const dPre = tf.mul(tf.matMul(dOut, w2T), ca[t] as tf.Tensor2D) as tf.Tensor2D;
        dss[t] = ds;
        dOuts[t] = dOut;
        dPres[t] = dPre;
        return { dz: tf.add(tf.mul(dy, es[t] as tf.Tensor2D), tf.matMul(dPre, wzT)) as tf.Tensor2D, dCtx: dPre };
      },
      weightGrads() {
        const dwz = tf.matMul(rows(Z), rows(tf.stack(dPres)), true, false);
        const dScale = columnSums(rows(tf.mul(tf.stack(dss), TH)));
        return [dwz, ...outputLayerGrads(A, dOuts), dScale];
      },
    };
  }
  const w2T = tf.transpose(weights[0] as tf.Tensor2D);
  const A = stacks[0] as tf.Tensor3D;
  const ca = tf.unstack(tanhSlope(A)) as tf.Tensor2D[];
  const finish = (t: number, dOut: tf.Tensor2D): tf.Tensor2D => {
    dOuts[t] = dOut;
    return tf.mul(tf.matMul(dOut, w2T), ca[t] as tf.Tensor2D) as tf.Tensor2D;
  };
  const weightGrads = () => outputLayerGrads(A, dOuts);
  if (parts.kind === 'shift') return { step: (t, dy) => ({ dz: dy, dCtx: finish(t, dy) }), weightGrads };
  const [, P, S, Z] = stacks as [tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor3D];
  const slope = tf.sigmoid(P);
  const c1 = tf.unstack(tf.mul(Z, slope)) as tf.Tensor2D[];
  const dlc0 = tf.unstack(tf.mul(dL, tf.div(slope, S))) as tf.Tensor2D[];
  const ss = inputGrad ? (tf.unstack(S) as tf.Tensor2D[]) : [];
  const lowerParts = parts.kind === 'tril' && parts.constants ? lowerBackward(parts.constants, stacks) : null;
  return {
    step(t, dy) {
      const dp = tf.add(tf.mul(dy, c1[t] as tf.Tensor2D), dlc0[t] as tf.Tensor2D) as tf.Tensor2D;
      const dz = inputGrad ? (tf.mul(dy, ss[t] as tf.Tensor2D) as tf.Tensor2D) : null;
      if (!lowerParts) return { dz, dCtx: finish(t, tf.concat([dy, dp], 1) as tf.Tensor2D) };
      const { dLower, dzLower } = lowerParts(t, dy);
      return { dz: dz && (tf.add(dz, dzLower) as tf.Tensor2D), dCtx: finish(t, tf.concat([dy, dp, dLower], 1) as tf.Tensor2D) };
    },
    weightGrads,
  };
}

/** The strictly-lower part of tril: with e = dy Add^T, d l = e * (z Pick) and dz gets (e * l) Pick^T. */
function lowerBackward(constants: tf.Tensor2D[], stacks: tf.Tensor3D[]) {
  const [pickT, addT] = constants.map((c) => tf.transpose(c)) as [tf.Tensor2D, tf.Tensor2D];
  const lower = tf.unstack(stacks[4] as tf.Tensor3D) as tf.Tensor2D[];
  const zp = tf.unstack(stacks[5] as tf.Tensor3D) as tf.Tensor2D[];
  return (t: number, dy: tf.Tensor2D) => {
    const e = tf.matMul(dy, addT);
    return {
      dLower: tf.mul(e, zp[t] as tf.Tensor2D) as tf.Tensor2D,
      dzLower: tf.matMul(tf.mul(e, lower[t] as tf.Tensor2D), pickT) as tf.Tensor2D,
    };
  };
}
