/**
 * Affine coupling layer (RealNVP, Dinh, Sohl-Dickstein & Bengio 2017), conditioned on c (MODEL.md section 3):
 * with a binary mask m, `y = m*z + (1-m)*(z*exp(s) + t)`, `(s, t) = net([m*z, c])`, `s = tanh(.) * scale`
 * (a learned per-dimension scale, so the exponent stays bounded); `log |det dy/dz| = sum (1-m)*s`.
 * Inverse: `z = m*y + (1-m)*((y - t)*exp(-s))` with `(s, t)` from `m*y` (which equals `m*z`).
 * The mask alternates halves from one coupling layer to the next (`parity`).
 *
 * Evaluation order (same values, fewer kernels): the mask is folded into the weights once per `prepare` —
 * `[m*z, c] W1 = z (diag(m) W1z) + c W1c`, and the output columns of s and t are multiplied by (1-m) — so s and t
 * are exactly 0 where m = 1, and `y = z*exp(s) + t` equals the masked formula entry by entry (there it gives
 * z*1 + 0 = z); likewise `z = (y - t)*exp(-s)` for the inverse.
 */
import * as tf from '@tensorflow/tfjs-core';
import { addBias } from '../bias-add';
import { constant, type ParamSpecs } from '../params';
import { conditionerSpecs, type VariableLookup } from './conditioner';
import type { FlowDims, FlowLayer, PreparedLayer } from './flow-layer';

/** The mask of a coupling layer: parity 0 keeps the first floor(d/2) entries fixed, parity 1 the rest. */
export function couplingMask(dim: number, parity: number): Float32Array {
  const half = Math.floor(dim / 2);
  const m = new Float32Array(dim);
  for (let i = 0; i < dim; i++) m[i] = (i < half) === (parity % 2 === 0) ? 1 : 0;
  return m;
}

interface CouplingConstants {
  /** m as a column [d, 1] (scales the rows of W1 that see z). */
  keptRows: tf.Tensor2D;
  /** 1 - m, [d]. */
  free: tf.Tensor1D;
  /** [1 - m, 1 - m], [2d] (scales the s and t output columns). */
  freeTwice: tf.Tensor1D;
}

export class CouplingFlow implements FlowLayer {
  readonly kind = 'coupling' as const;
  private readonly mask: Float32Array;
  private readonly inverseMask: Float32Array;
  private constants: CouplingConstants | null = null;

  constructor(private readonly dims: FlowDims, parity: number) {
    this.mask = couplingMask(dims.dim, parity);
    this.inverseMask = this.mask.map((v) => 1 - v);
  }

  specs(): ParamSpecs {
    const d = this.dims.dim;
    return {
      ...conditionerSpecs('net.', d + this.dims.ctxDim, this.dims.hidden, 2 * d),
      scale: constant([d], 1),
    };
  }

  allocate(): void {
    if (this.constants) return;
    const d = this.dims.dim;
    const twice = new Float32Array(2 * d);
    twice.set(this.inverseMask, 0);
    twice.set(this.inverseMask, d);
    this.constants = {
      keptRows: tf.keep(tf.tensor2d(this.mask, [d, 1])),
      free: tf.keep(tf.tensor1d(this.inverseMask)),
      freeTwice: tf.keep(tf.tensor1d(twice)),
    };
  }

  dispose(): void {
    if (this.constants) tf.dispose([this.constants.keptRows, this.constants.free, this.constants.freeTwice]);
    this.constants = null;
  }

  contextWeights(get: VariableLookup): { w: tf.Tensor2D; b: tf.Tensor1D } {
    const { dim: d, ctxDim, hidden } = this.dims;
    return { w: tf.slice(get('net.w1') as tf.Tensor2D, [d, 0], [ctxDim, hidden]), b: get('net.b1') as tf.Tensor1D };
  }

  prepare(get: VariableLookup): PreparedLayer {
    this.allocate();
    const k = this.constants as CouplingConstants;
    const { dim: d, hidden } = this.dims;
    const wz = tf.mul(tf.slice(get('net.w1'), [0, 0], [d, hidden]), k.keptRows);
    const w2 = tf.mul(get('net.w2'), k.freeTwice);
    const b2 = tf.mul(get('net.b2'), k.freeTwice);
    const scale = tf.mul(get('scale'), k.free);
    // The inverse uses -s = tanh(.) * (-scale) directly (negation is exact), saving two kernels per call.
    const minusScale = tf.neg(scale);
    /** (s, t) — or (-s, t) with `minusScale` — both exactly 0 where the mask is 1; `x` is z (forward) or y (inverse): m*x is the same. */
    const shiftScale = (ctxPre: tf.Tensor2D, x: tf.Tensor2D, sScale: tf.Tensor) => {
      const h = tf.tanh(tf.add(tf.matMul(x, wz), ctxPre));
      const [sRaw, t] = tf.split(addBias(tf.matMul(h, w2), b2 as tf.Tensor1D), 2, 1) as [tf.Tensor2D, tf.Tensor2D];
      return { s: tf.mul(tf.tanh(sRaw), sScale) as tf.Tensor2D, t };
    };
    return {
      parts: { kind: 'coupling', dim: d, weights: [wz, w2, b2, scale] },
      forward: (ctxPre, z) => {
        const { s, t } = shiftScale(ctxPre, z, scale);
        return { y: tf.add(tf.mul(z, tf.exp(s)), t) as tf.Tensor2D, logdet: tf.sum(s, 1) };
      },
      inverse: (ctxPre, y) => {
        const { s: minusS, t } = shiftScale(ctxPre, y, minusScale);
        return { z: tf.mul(tf.sub(y, t), tf.exp(minusS)) as tf.Tensor2D, logdet: tf.sum(minusS, 1) };
      },
    };
  }
}
