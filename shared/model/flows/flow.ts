/**
 * Conditional flows (MODEL.md section 3): for every conditioning vector c (the previous state h_{t-1}),
 * z -> y is a bijection with a tractable log-determinant. A flow is a stack of layers (log-dets add, the
 * inverse runs the stack backwards); the same code serves the generative flow f_g and the inference flow f_q,
 * each with its own weights.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { Rng } from '../../data/random';
import { addBias } from '../bias-add';
import { ParamSet, prefixSpecs, type NamedWeights, type ParamSpecs } from '../params';
import { CouplingFlow } from './coupling-flow';
import { DiagFlow } from './diag-flow';
import type { FlowDims, FlowForward, FlowInverse, FlowKind, FlowLayer, ForwardParts, PreparedLayer } from './flow-layer';
import { FLOW_KIND_NAMES } from '../settings-rules';
import { ShiftFlow } from './shift-flow';
import { TrilFlow } from './tril-flow';

export type { FlowForward, FlowInverse, FlowKind, ForwardParts } from './flow-layer';

/** One layer of a flow stack. A flow is described by an array of these, applied in order to z. */
export interface FlowSpec {
  kind: FlowKind;
}

export const FLOW_KINDS: readonly FlowKind[] = FLOW_KIND_NAMES;

export interface ConditionalFlow {
  readonly spec: readonly FlowSpec[];
  readonly dims: FlowDims;
  /** Trainable variables in a stable order. */
  readonly variables: tf.Variable[];
  /** Parameter names (as in `getWeights`), in the order of `variables`. */
  readonly variableNames: string[];
  readonly parameterCount: number;
  /** `y = f(c, z)` with `log |det dy/dz|` per row. c: [N, ctxDim], z: [N, dim]. */
  forward(c: tf.Tensor2D, z: tf.Tensor2D): FlowForward;
  /** `z = f^{-1}(c, y)` with `log |det dz/dy|` per row (= minus the forward log-det at z). */
  inverse(c: tf.Tensor2D, y: tf.Tensor2D): FlowInverse;
  /**
   * The flow with its per-call constants in place, for running many steps on the same weights (call inside a
   * tf.tidy). Its conditioners' products with c are left to the caller: `ctxPre = c contextW + contextB`.
   */
  prepare(): PreparedFlow;
  getWeights(): NamedWeights;
  setWeights(weights: NamedWeights): void;
  dispose(): void;
}

/** A flow with its constants in place; `ctxPre = c contextW + contextB` ([N, contextWidth]) stands for c. */
export interface PreparedFlow {
  /** [ctxDim, contextWidth]: the first-layer weights of every layer's conditioner that act on c, side by side. */
  readonly contextW: tf.Tensor2D;
  readonly contextB: tf.Tensor1D;
  readonly contextWidth: number;
  forward(ctxPre: tf.Tensor2D, z: tf.Tensor2D): FlowForward;
  inverse(ctxPre: tf.Tensor2D, y: tf.Tensor2D): FlowInverse;
  /**
   * The inverse given c itself: each layer's ctxPre from its own matmul with c (for many rows this avoids
   * splitting one wide ctxPre, and concatenating its gradient, at the price of one matmul per layer).
   */
  inverseFromContext(c: tf.Tensor2D, y: tf.Tensor2D): FlowInverse;
  /** Each layer's forward tensors, in stack order (for the hand-written gradient of the inference recurrence). */
  readonly layers: ForwardParts[];
}

/** Throws a clear error if `spec` is not a non-empty list of known flow layers. */
export function validateFlowSpec(spec: unknown, what = 'flow'): asserts spec is FlowSpec[] {
  if (!Array.isArray(spec) || spec.length === 0) {
    throw new Error(`The ${what} needs at least one layer, e.g. [{ "kind": "diag" }].`);
  }
  spec.forEach((layer: unknown, i) => {
    const kind = (layer as { kind?: unknown } | null)?.kind;
    if (typeof kind !== 'string' || !FLOW_KINDS.includes(kind as FlowKind)) {
      throw new Error(`Layer ${i + 1} of the ${what} has kind ${JSON.stringify(kind)}; use one of ${FLOW_KINDS.join(', ')}.`);
    }
  });
}

function buildLayers(spec: readonly FlowSpec[], dims: FlowDims): FlowLayer[] {
  let couplings = 0;
  return spec.map((layer) => {
    switch (layer.kind) {
      case 'shift':
        return new ShiftFlow(dims);
      case 'diag':
        return new DiagFlow(dims);
      case 'tril':
        return new TrilFlow(dims);
      case 'coupling':
        return new CouplingFlow(dims, couplings++);
    }
  });
}

const layerPrefix = (i: number, layer: FlowLayer): string => `${i}.${layer.kind}.`;

/** Parameter specs of a flow stack without creating it (names `<index>.<kind>.<param>`). */
export function flowParamSpecs(spec: readonly FlowSpec[], dims: FlowDims): ParamSpecs {
  validateFlowSpec(spec);
  const out: ParamSpecs = {};
  buildLayers(spec, dims).forEach((layer, i) => Object.assign(out, prefixSpecs(layerPrefix(i, layer), layer.specs())));
  return out;
}

class FlowStack implements ConditionalFlow {
  readonly variables: tf.Variable[];
  readonly variableNames: string[];
  private readonly layers: FlowLayer[];
  private readonly params: ParamSet;
  private readonly lookups: ((name: string) => tf.Variable)[];

  constructor(readonly spec: readonly FlowSpec[], readonly dims: FlowDims, rng: Rng) {
    this.layers = buildLayers(spec, dims);
    for (const layer of this.layers) layer.allocate();
    this.params = new ParamSet(flowParamSpecs(spec, dims), rng);
    this.variables = this.params.list();
    this.variableNames = this.params.nameList;
    this.lookups = this.layers.map((layer, i) => {
      const prefix = layerPrefix(i, layer);
      return (name: string) => this.params.get(prefix + name);
    });
  }

  get parameterCount(): number {
    return this.params.parameterCount;
  }

  prepare(): PreparedFlow {
    const layers = this.layers.map((layer, i) => layer.prepare(this.lookups[i] as (n: string) => tf.Variable));
    const ctx = this.layers.map((layer, i) => layer.contextWeights(this.lookups[i] as (n: string) => tf.Variable));
    const single = ctx.length === 1;
    const first = ctx[0] as { w: tf.Tensor2D; b: tf.Tensor1D };
    const parts = (ctxPre: tf.Tensor2D): tf.Tensor2D[] => (single ? [ctxPre] : (tf.split(ctxPre, layers.length, 1) as tf.Tensor2D[]));
    // The side-by-side context weights only when asked for (the training step's generative flow never is:
    // it uses inverseFromContext), then kept for the prepared flow's lifetime.
    let contextW: tf.Tensor2D | undefined;
    let contextB: tf.Tensor1D | undefined;
    return {
      get contextW() {
        return (contextW ??= single ? first.w : (tf.concat(ctx.map((x) => x.w), 1) as tf.Tensor2D));
      },
      get contextB() {
        return (contextB ??= single ? first.b : (tf.concat(ctx.map((x) => x.b)) as tf.Tensor1D));
      },
      contextWidth: this.dims.hidden * layers.length,
      layers: layers.map((layer) => layer.parts),
      forward: (ctxPre, z) => {
        const pre = parts(ctxPre);
        let y = z;
        let logdet: tf.Tensor1D | null = null;
        layers.forEach((layer, i) => {
          const r = layer.forward(pre[i] as tf.Tensor2D, y);
          y = r.y;
          logdet = logdet ? (tf.add(logdet, r.logdet) as tf.Tensor1D) : r.logdet;
        });
        return { y, logdet: logdet as unknown as tf.Tensor1D };
      },
      inverse: (ctxPre, y) => inverseLayers(parts(ctxPre), y),
      inverseFromContext: (c, y) => inverseLayers(ctx.map((x) => addBias(tf.matMul(c, x.w), x.b)), y),
    };
    function inverseLayers(pre: tf.Tensor2D[], y: tf.Tensor2D): FlowInverse {
      let z = y;
      let logdet: tf.Tensor1D | null = null;
      for (let i = layers.length - 1; i >= 0; i--) {
        const r = (layers[i] as PreparedLayer).inverse(pre[i] as tf.Tensor2D, z);
        z = r.z;
        logdet = logdet ? (tf.add(logdet, r.logdet) as tf.Tensor1D) : r.logdet;
      }
      return { z, logdet: logdet as unknown as tf.Tensor1D };
    }
  }

  forward(c: tf.Tensor2D, z: tf.Tensor2D): FlowForward {
    const [y, logdet] = tf.tidy(() => {
      const p = this.prepare();
      const r = p.forward(tf.add(tf.matMul(c, p.contextW), p.contextB) as tf.Tensor2D, z);
      return [r.y, r.logdet];
    });
    return { y: y as tf.Tensor2D, logdet: logdet as tf.Tensor1D };
  }

  inverse(c: tf.Tensor2D, y: tf.Tensor2D): FlowInverse {
    const [z, logdet] = tf.tidy(() => {
      const p = this.prepare();
      const r = p.inverse(tf.add(tf.matMul(c, p.contextW), p.contextB) as tf.Tensor2D, y);
      return [r.z, r.logdet];
    });
    return { z: z as tf.Tensor2D, logdet: logdet as tf.Tensor1D };
  }

  getWeights(): NamedWeights {
    return this.params.getWeights();
  }

  setWeights(weights: NamedWeights): void {
    this.params.setWeights(weights, 'flow');
  }

  dispose(): void {
    for (const layer of this.layers) layer.dispose();
    this.params.dispose();
  }
}

/**
 * Creates a conditional flow stack on z of size `dim`, conditioned on c of size `ctxDim`; every conditioning
 * network has one hidden `tanh` layer of width `hidden`. Initial weights are drawn from `rng`.
 */
export function createFlow(spec: FlowSpec[], dim: number, ctxDim: number, hidden: number, rng: Rng): ConditionalFlow {
  validateFlowSpec(spec);
  for (const [name, v] of [['dim', dim], ['ctxDim', ctxDim], ['hidden', hidden]] as const) {
    if (!Number.isInteger(v) || v < 1) throw new Error(`Flow ${name} must be a positive integer; got ${v}.`);
  }
  return new FlowStack(spec, { dim, ctxDim, hidden }, rng);
}
