/** The contract every single flow layer implements (a stack of layers is itself a `ConditionalFlow`). */
import type * as tf from '@tensorflow/tfjs-core';
import type { ParamSpecs } from '../params';
import type { VariableLookup } from './conditioner';

export type FlowKind = 'shift' | 'diag' | 'tril' | 'coupling';

/** Result of running a flow forward: `y = f(c, z)` and `log |det dy/dz|` per row. */
export interface FlowForward {
  y: tf.Tensor2D;
  logdet: tf.Tensor1D;
}

/** Result of running a flow backward: `z = f^{-1}(c, y)` and `log |det dz/dy|` per row. */
export interface FlowInverse {
  z: tf.Tensor2D;
  logdet: tf.Tensor1D;
}

export interface FlowLayer {
  readonly kind: FlowKind;
  /** Parameter specs with names local to this layer (the stack adds a `<index>.<kind>.` prefix). */
  specs(): ParamSpecs;
  forward(get: VariableLookup, c: tf.Tensor2D, z: tf.Tensor2D): FlowForward;
  inverse(get: VariableLookup, c: tf.Tensor2D, y: tf.Tensor2D): FlowInverse;
}

/** Shapes shared by all layers of one flow. */
export interface FlowDims {
  /** Size of z and y (the state size d). */
  dim: number;
  /** Size of the conditioning vector c (the previous state, so also d in the model). */
  ctxDim: number;
  /** Width of the hidden layer of each conditioning network. */
  hidden: number;
}
