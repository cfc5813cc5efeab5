/**
 * Triangular shift-scale flow: `y = mu(c) + L(c) z` with `L` lower-triangular, its strictly-lower entries
 * from the net and its diagonal `sigma(c) = softplus(.) + 1e-4 > 0`; `log |det dy/dz| = sum_i log sigma_i`
 * (MODEL.md section 3). `mu`, the pre-activation of `sigma` and the `d(d-1)/2` lower entries come out of one
 * fused matmul. The inverse solves `L z = y - mu` by forward substitution.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { ParamSpecs } from '../params';
import { boundedScale, conditionerOutput, conditionerSpecs, contextOf, SOFTPLUS_INVERSE_OF_ONE, type VariableLookup } from './conditioner';
import type { FlowDims, FlowLayer, PreparedLayer } from './flow-layer';

interface TriangularParts {
  mu: tf.Tensor2D;
  sigma: tf.Tensor2D;
  /** Strictly-lower entries of L in row-major order, [N, d(d-1)/2] (null when d = 1). */
  lower: tf.Tensor2D | null;
}

export class TrilFlow implements FlowLayer {
  readonly kind = 'tril' as const;
  private readonly lowerCount: number;
  /** One-hot [d, P]: column k picks z_j for lower entry k = (i, j). */
  private readonly pickColumn: Float32Array;
  /** One-hot [P, d]: row k adds into output row i for lower entry k = (i, j). */
  private readonly addToRow: Float32Array;
  private constants: { pick: tf.Tensor2D; add: tf.Tensor2D } | null = null;

  constructor(private readonly dims: FlowDims) {
    const d = dims.dim;
    const P = (d * (d - 1)) / 2;
    this.lowerCount = P;
    this.pickColumn = new Float32Array(d * P);
    this.addToRow = new Float32Array(P * d);
    let k = 0;
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < i; j++) {
        this.pickColumn[j * P + k] = 1;
        this.addToRow[k * d + i] = 1;
        k++;
      }
    }
  }

  allocate(): void {
    if (this.constants || this.lowerCount === 0) return;
    const d = this.dims.dim;
    const P = this.lowerCount;
    this.constants = {
      pick: tf.keep(tf.tensor2d(this.pickColumn, [d, P])),
      add: tf.keep(tf.tensor2d(this.addToRow, [P, d])),
    };
  }

  dispose(): void {
    if (this.constants) tf.dispose([this.constants.pick, this.constants.add]);
    this.constants = null;
  }

  /**
   * `S z` for the strictly-lower part S without building S: gather z_j per entry, scale by the entry, and sum
   * into its row — two small matmuls with constant one-hot matrices (no gather op, whose gradient the WASM
   * backend lacks).
   */
  private lowerTimes(lower: tf.Tensor2D, z: tf.Tensor2D): tf.Tensor2D {
    this.allocate();
    const k = this.constants as { pick: tf.Tensor2D; add: tf.Tensor2D };
    return tf.matMul(tf.mul(lower, tf.matMul(z, k.pick)), k.add);
  }

  specs(): ParamSpecs {
    const d = this.dims.dim;
    const bias = [
      ...new Array<number>(d).fill(0),
      ...new Array<number>(d).fill(SOFTPLUS_INVERSE_OF_ONE),
      ...new Array<number>(this.lowerCount).fill(0),
    ];
    return conditionerSpecs('net.', this.dims.ctxDim, this.dims.hidden, 2 * d + this.lowerCount, bias);
  }

  contextWeights(get: VariableLookup): { w: tf.Tensor2D; b: tf.Tensor1D } {
    return contextOf(get, 'net.');
  }

  private parts(get: VariableLookup, ctxPre: tf.Tensor2D): TriangularParts {
    const d = this.dims.dim;
    const out = conditionerOutput(get, 'net.', ctxPre);
    if (this.lowerCount === 0) {
      const [mu, pre] = tf.split(out, 2, 1) as [tf.Tensor2D, tf.Tensor2D];
      return { mu, sigma: boundedScale(pre) as tf.Tensor2D, lower: null };
    }
    const [mu, pre, lower] = tf.split(out, [d, d, this.lowerCount], 1) as [tf.Tensor2D, tf.Tensor2D, tf.Tensor2D];
    return { mu, sigma: boundedScale(pre) as tf.Tensor2D, lower };
  }

  prepare(get: VariableLookup): PreparedLayer {
    this.allocate();
    const constants = this.constants ? [this.constants.pick, this.constants.add] : undefined;
    return {
      parts: { kind: 'tril', dim: this.dims.dim, weights: [get('net.w2'), get('net.b2')], ...(constants ? { constants } : {}) },
      forward: (ctxPre, z) => {
        const { mu, sigma, lower } = this.parts(get, ctxPre);
        let y = tf.add(mu, tf.mul(sigma, z));
        if (lower) y = tf.add(y, this.lowerTimes(lower, z));
        return { y: y as tf.Tensor2D, logdet: tf.sum(tf.log(sigma), 1) };
      },
      /**
       * Forward substitution written as `d - 1` vectorised sweeps `z <- (r - S z) / sigma` (S strictly lower):
       * after sweep k the first k + 1 entries equal those of row-by-row substitution, so d - 1 sweeps are exact.
       */
      inverse: (ctxPre, y) => {
        const { mu, sigma, lower } = this.parts(get, ctxPre);
        const r = tf.sub(y, mu);
        let z = tf.div(r, sigma) as tf.Tensor2D;
        if (lower) {
          for (let k = 1; k < this.dims.dim; k++) z = tf.div(tf.sub(r, this.lowerTimes(lower, z)), sigma) as tf.Tensor2D;
        }
        return { z, logdet: tf.neg(tf.sum(tf.log(sigma), 1)) as tf.Tensor1D };
      },
    };
  }
}
