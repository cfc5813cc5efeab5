/** Shift flow: `y = z + mu(c)`; log-determinant 0 (MODEL.md section 3). */
import * as tf from '@tensorflow/tfjs-core';
import type { ParamSpecs } from '../params';
import { conditionerSpecs, runConditioner, type VariableLookup } from './conditioner';
import type { FlowDims, FlowForward, FlowInverse, FlowLayer } from './flow-layer';

export class ShiftFlow implements FlowLayer {
  readonly kind = 'shift' as const;
  constructor(private readonly dims: FlowDims) {}

  specs(): ParamSpecs {
    return conditionerSpecs('mu.', this.dims.ctxDim, this.dims.hidden, this.dims.dim);
  }

  forward(get: VariableLookup, c: tf.Tensor2D, z: tf.Tensor2D): FlowForward {
    const mu = runConditioner(get, 'mu.', c);
    return { y: tf.add(z, mu), logdet: tf.zeros([z.shape[0]]) };
  }

  inverse(get: VariableLookup, c: tf.Tensor2D, y: tf.Tensor2D): FlowInverse {
    const mu = runConditioner(get, 'mu.', c);
    return { z: tf.sub(y, mu), logdet: tf.zeros([y.shape[0]]) };
  }
}
