/**
 * Named, seeded trainable parameters shared by every model family.
 *
 * A model declares its parameters as a table of specs (name -> shape + initialiser); `ParamSet` creates the
 * TF.js variables in name order from a seeded random stream, so the same settings and seed always give the
 * same initial weights on every platform. Variable names in the TF.js engine are left automatic (they must be
 * unique engine-wide); the names used here are local to the set and are the names stored in checkpoints.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { Rng } from '../data/random';

/** Weights as plain arrays, keyed by parameter name (the unit of checkpoints and transfers). */
export type NamedWeights = Record<string, { shape: number[]; values: Float32Array }>;

export type ParamInit =
  /** Glorot (Xavier) uniform: U(-a, a), a = gain * sqrt(6 / (fanIn + fanOut)). */
  | { kind: 'glorot'; fanIn: number; fanOut: number; gain?: number }
  /** Every entry the same value (zeros for most biases). */
  | { kind: 'const'; value: number }
  /** Explicit values (length = size of the shape), e.g. a bias whose parts start at different values. */
  | { kind: 'values'; values: number[] };

export interface ParamSpec {
  shape: number[];
  init: ParamInit;
}

export type ParamSpecs = Record<string, ParamSpec>;

export const zeros = (shape: number[]): ParamSpec => ({ shape, init: { kind: 'const', value: 0 } });
export const constant = (shape: number[], value: number): ParamSpec => ({ shape, init: { kind: 'const', value } });
/** A [fanIn, fanOut] matrix with Glorot-uniform initial values. */
export const glorot = (fanIn: number, fanOut: number, gain = 1): ParamSpec => ({
  shape: [fanIn, fanOut],
  init: { kind: 'glorot', fanIn, fanOut, gain },
});

export const sizeOf = (shape: readonly number[]): number => shape.reduce((a, b) => a * b, 1);

/** Prefixes every name of a spec table (e.g. `gen/` for the generative flow). */
export function prefixSpecs(prefix: string, specs: ParamSpecs): ParamSpecs {
  const out: ParamSpecs = {};
  for (const [name, spec] of Object.entries(specs)) out[prefix + name] = spec;
  return out;
}

/** Total number of scalar parameters in a spec table (for "parameter count" before training). */
export function countParams(specs: ParamSpecs): number {
  return Object.values(specs).reduce((n, s) => n + sizeOf(s.shape), 0);
}

/** Initial values of one parameter drawn from `rng`. */
export function initialValues(spec: ParamSpec, rng: Rng): Float32Array {
  const out = new Float32Array(sizeOf(spec.shape));
  const init = spec.init;
  if (init.kind === 'const') {
    out.fill(init.value);
  } else if (init.kind === 'values') {
    if (init.values.length !== out.length) throw new Error('Internal error: initial values do not match the shape.');
    out.set(init.values);
  } else {
    const limit = (init.gain ?? 1) * Math.sqrt(6 / (init.fanIn + init.fanOut));
    for (let i = 0; i < out.length; i++) out[i] = (2 * rng.next() - 1) * limit;
  }
  return out;
}

/** Thrown when weights do not fit a model's settings (missing, extra, or wrongly shaped tensors). */
export class WeightShapeError extends Error {
  override readonly name = 'WeightShapeError';
  readonly code = 'SHAPE_MISMATCH';
}

const sameShape = (a: readonly number[], b: readonly number[]): boolean =>
  a.length === b.length && a.every((v, i) => v === b[i]);

/**
 * Checks that `weights` has exactly the tensors of `specs` with the same shapes and matching value counts.
 * Throws a `WeightShapeError` naming the first problem; changes nothing.
 */
export function checkWeightShapes(specs: ParamSpecs, weights: NamedWeights, what: string): void {
  for (const [name, spec] of Object.entries(specs)) {
    const w = weights[name];
    if (!w) {
      throw new WeightShapeError(
        `The ${what} weights have no tensor "${name}"; they were saved for different model settings. ` +
          'Load them into a model built with the settings stored next to them.',
      );
    }
    if (!sameShape(w.shape, spec.shape) || w.values.length !== sizeOf(spec.shape)) {
      throw new WeightShapeError(
        `The ${what} tensor "${name}" has shape [${w.shape.join(', ')}] (${w.values.length} values) but these ` +
          `settings need [${spec.shape.join(', ')}]; load it into a model built with the matching settings.`,
      );
    }
  }
  for (const name of Object.keys(weights)) {
    if (!(name in specs)) {
      throw new WeightShapeError(
        `The ${what} weights have a tensor "${name}" that these settings do not use; ` +
          'load them into a model built with the settings stored next to them.',
      );
    }
  }
}

/** A set of trainable TF.js variables created from a spec table. */
export class ParamSet {
  readonly specs: ParamSpecs;
  readonly variables: Record<string, tf.Variable>;
  private readonly names: string[];

  constructor(specs: ParamSpecs, rng: Rng) {
    this.specs = specs;
    this.names = Object.keys(specs).sort();
    this.variables = {};
    for (const name of this.names) {
      const spec = specs[name] as ParamSpec;
      const values = initialValues(spec, rng.fork(name));
      // In a tidy: the initial-value tensor would otherwise stay registered next to the variable (a leak per weight).
      this.variables[name] = tf.tidy(() => tf.variable(tf.tensor(values, spec.shape, 'float32'), true));
    }
  }

  /** The variable called `name`; throws if this set has none (a programming error). */
  get(name: string): tf.Variable {
    const v = this.variables[name];
    if (!v) throw new Error(`Internal error: no parameter "${name}" in this model.`);
    return v;
  }

  get parameterCount(): number {
    return countParams(this.specs);
  }

  /** Names in the order of `list()`. */
  get nameList(): string[] {
    return this.names.slice();
  }

  /** The variables in name order (for gradients and optimisers). */
  list(): tf.Variable[] {
    return this.names.map((n) => this.get(n));
  }

  getWeights(): NamedWeights {
    const out: NamedWeights = {};
    for (const name of this.names) {
      const v = this.get(name);
      out[name] = { shape: v.shape.slice(), values: Float32Array.from(v.dataSync() as Float32Array) };
    }
    return out;
  }

  /** Replaces every variable's value; validates all shapes first so a bad input changes nothing. */
  setWeights(weights: NamedWeights, what = 'model'): void {
    checkWeightShapes(this.specs, weights, what);
    for (const name of this.names) {
      const w = weights[name] as NamedWeights[string];
      const v = this.get(name);
      tf.tidy(() => v.assign(tf.tensor(w.values, w.shape, 'float32')));
    }
  }

  dispose(): void {
    for (const name of this.names) this.get(name).dispose();
  }
}
