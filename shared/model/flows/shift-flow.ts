/** Shift flow: `y = z + mu(c)`; log-determinant 0 (MODEL.md section 3). */
import * as tf from '@tensorflow/tfjs-core';
import type { ParamSpecs } from '../params';
import { conditionerOutput, conditionerSpecs, contextOf, type VariableLookup } from './conditioner';
import type { FlowDims, FlowLayer, PreparedLayer } from './flow-layer';

export class ShiftFlow implements FlowLayer {
  readonly kind = 'shift' as const;
  constructor(private readonly dims: FlowDims) {}

  specs(): ParamSpecs {
    return conditionerSpecs('mu.', this.dims.ctxDim, this.dims.hidden, this.dims.dim);
  }

  contextWeights(get: VariableLookup): { w: tf.Tensor2D; b: tf.Tensor1D } {
    return contextOf(get, 'mu.');
  }

  prepare(get: VariableLookup): PreparedLayer {
    return {
      parts: { kind: 'shift', dim: this.dims.dim, weights: [get('mu.w2'), get('mu.b2')] },
      forward: (ctxPre, z) => ({ y: tf.add(z, conditionerOutput(get, 'mu.', ctxPre)), logdet: tf.zeros([z.shape[0]]) }),
      inverse: (ctxPre, y) => ({ z: tf.sub(y, conditionerOutput(get, 'mu.', ctxPre)), logdet: tf.zeros([y.shape[0]]) }),
    };
  }

  allocate(): void {}

  dispose(): void {}
}
