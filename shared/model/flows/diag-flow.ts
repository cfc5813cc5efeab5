/**
 * Diagonal shift-scale flow: `y = mu(c) + sigma(c) * z` with `sigma = softplus(.) + 1e-4`;
 * `log |det dy/dz| = sum_i log sigma_i` (MODEL.md section 3). `mu` and `sigma` come from one fused matmul.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { ParamSpecs } from '../params';
import { boundedScale, conditionerOutput, conditionerSpecs, contextOf, SOFTPLUS_INVERSE_OF_ONE, type VariableLookup } from './conditioner';
import type { FlowDims, FlowLayer, PreparedLayer } from './flow-layer';

export class DiagFlow implements FlowLayer {
  readonly kind = 'diag' as const;
  constructor(private readonly dims: FlowDims) {}

  specs(): ParamSpecs {
    const d = this.dims.dim;
    const bias = [...new Array<number>(d).fill(0), ...new Array<number>(d).fill(SOFTPLUS_INVERSE_OF_ONE)];
    return conditionerSpecs('net.', this.dims.ctxDim, this.dims.hidden, 2 * d, bias);
  }

  contextWeights(get: VariableLookup): { w: tf.Tensor2D; b: tf.Tensor1D } {
    return contextOf(get, 'net.');
  }

  prepare(get: VariableLookup): PreparedLayer {
    const muSigma = (ctxPre: tf.Tensor2D) => {
      const [mu, pre] = tf.split(conditionerOutput(get, 'net.', ctxPre), 2, 1) as [tf.Tensor2D, tf.Tensor2D];
      return { mu, sigma: boundedScale(pre) as tf.Tensor2D };
    };
    return {
      parts: { kind: 'diag', dim: this.dims.dim, weights: [get('net.w2'), get('net.b2')] },
      forward: (ctxPre, z) => {
        const { mu, sigma } = muSigma(ctxPre);
        return { y: tf.add(mu, tf.mul(sigma, z)), logdet: tf.sum(tf.log(sigma), 1) };
      },
      inverse: (ctxPre, y) => {
        const { mu, sigma } = muSigma(ctxPre);
        return { z: tf.div(tf.sub(y, mu), sigma), logdet: tf.neg(tf.sum(tf.log(sigma), 1)) as tf.Tensor1D };
      },
    };
  }

  allocate(): void {}

  dispose(): void {}
}
