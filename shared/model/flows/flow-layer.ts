/** The contract every single flow layer implements (a stack of layers is itself a `ConditionalFlow`). */
import type * as tf from '@tensorflow/tfjs-core';
import type { ParamSpecs } from '../params';
import type { FlowKindName } from '../settings-rules';
import type { VariableLookup } from './conditioner';

export type FlowKind = FlowKindName;

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

/**
 * A layer with its per-call constants in place (weights rearranged once per `prepare`, not once per step).
 * `ctxPre` is the layer's context pre-activation `c W1c + b1`, [N, hidden]: the part of its conditioner's first
 * layer that depends on c only, so a caller can compute it for many layers (and flows) in one matmul.
 */
export interface PreparedLayer {
  forward(ctxPre: tf.Tensor2D, z: tf.Tensor2D): FlowForward;
  inverse(ctxPre: tf.Tensor2D, y: tf.Tensor2D): FlowInverse;
  /** The tensors `forward` computes with, for the hand-written gradient of `flows/forward-grads.ts`. */
  readonly parts: ForwardParts;
}

/**
 * What a layer's forward pass uses beyond ctxPre and z, in a fixed order per kind:
 * shift, diag, tril: [W2, b2] (the conditioner's second layer); coupling: [W1z (masked), W2 (masked), b2 (masked),
 * scale (masked)]. `constants` (no gradient): tril's one-hot [pick, add] matrices when d > 1.
 */
export interface ForwardParts {
  readonly kind: FlowKind;
  /** Size of z (the state size d). */
  readonly dim: number;
  readonly weights: tf.Tensor[];
  readonly constants?: tf.Tensor2D[];
}

export interface FlowLayer {
  readonly kind: FlowKind;
  /** Parameter specs with names local to this layer (the stack adds a `<index>.<kind>.` prefix). */
  specs(): ParamSpecs;
  /** Rows of the first-layer weight acting on c, [ctxDim, hidden], and the first-layer bias [hidden]. */
  contextWeights(get: VariableLookup): { w: tf.Tensor2D; b: tf.Tensor1D };
  /** Call inside a tf.tidy; the result is valid while that scope lives. */
  prepare(get: VariableLookup): PreparedLayer;
  /** Creates the layer's constant tensors (if any); called once by the owning stack. */
  allocate(): void;
  /** Frees the constant tensors made by `allocate`. */
  dispose(): void;
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
