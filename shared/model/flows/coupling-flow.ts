/**
 * Affine coupling layer (RealNVP, Dinh, Sohl-Dickstein & Bengio 2017), conditioned on c (MODEL.md section 3):
 * with a binary mask m, `y = m*z + (1-m)*(z*exp(s) + t)`, `(s, t) = net([m*z, c])`, `s = tanh(.) * scale`
 * (a learned per-dimension scale, so the exponent stays bounded); `log |det dy/dz| = sum (1-m)*s`.
 * Inverse: `z = m*y + (1-m)*((y - t)*exp(-s))` with `(s, t)` from `m*y` (which equals `m*z`).
 * The mask alternates halves from one coupling layer to the next (`parity`).
 */
import * as tf from '@tensorflow/tfjs-core';
import { constant, type ParamSpecs } from '../params';
import { conditionerSpecs, runConditioner, type VariableLookup } from './conditioner';
import type { FlowDims, FlowForward, FlowInverse, FlowLayer } from './flow-layer';

/** The mask of a coupling layer: parity 0 keeps the first floor(d/2) entries fixed, parity 1 the rest. */
export function couplingMask(dim: number, parity: number): Float32Array {
  const half = Math.floor(dim / 2);
  const m = new Float32Array(dim);
  for (let i = 0; i < dim; i++) m[i] = (i < half) === (parity % 2 === 0) ? 1 : 0;
  return m;
}

export class CouplingFlow implements FlowLayer {
  readonly kind = 'coupling' as const;
  private readonly mask: Float32Array;
  private readonly inverseMask: Float32Array;

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

  /** (s, t) restricted to the transformed entries (zero where the mask is 1). */
  private shiftScale(get: VariableLookup, c: tf.Tensor2D, kept: tf.Tensor2D): { s: tf.Tensor2D; t: tf.Tensor2D } {
    const out = runConditioner(get, 'net.', tf.concat([kept, c], 1));
    const [sRaw, t] = tf.split(out, 2, 1) as [tf.Tensor2D, tf.Tensor2D];
    const free = tf.tensor1d(this.inverseMask);
    return { s: tf.mul(tf.mul(tf.tanh(sRaw), get('scale')), free), t: tf.mul(t, free) };
  }

  forward(get: VariableLookup, c: tf.Tensor2D, z: tf.Tensor2D): FlowForward {
    const kept = tf.mul(z, tf.tensor1d(this.mask)) as tf.Tensor2D;
    const { s, t } = this.shiftScale(get, c, kept);
    const free = tf.tensor1d(this.inverseMask);
    const y = tf.add(kept, tf.mul(free, tf.add(tf.mul(z, tf.exp(s)), t)));
    return { y: y as tf.Tensor2D, logdet: tf.sum(s, 1) };
  }

  inverse(get: VariableLookup, c: tf.Tensor2D, y: tf.Tensor2D): FlowInverse {
    const kept = tf.mul(y, tf.tensor1d(this.mask)) as tf.Tensor2D;
    const { s, t } = this.shiftScale(get, c, kept);
    const free = tf.tensor1d(this.inverseMask);
    const z = tf.add(kept, tf.mul(free, tf.mul(tf.sub(y, t), tf.exp(tf.neg(s)))));
    return { z: z as tf.Tensor2D, logdet: tf.neg(tf.sum(s, 1)) as tf.Tensor1D };
  }
}
