/**
 * Adam (Kingma & Ba 2015) with bias correction, written in TF.js ops so its state is plain named tensors that
 * a checkpoint can store and a resumed run can restore exactly. Updates run inside the caller's tf.tidy.
 *
 * All weights are updated as one flat vector (a dozen kernels per step instead of a dozen per weight): the
 * moments m and v are single flat variables, in the order of the variables given to the constructor. The
 * checkpoint layout stays per weight (`m/<name>`, `v/<name>`), cut out of and put back into the flat vectors.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { NamedWeights } from './params';

export interface AdamSettings {
  learningRate: number;
  beta1?: number;
  beta2?: number;
  epsilon?: number;
}

/** The tensors laid end to end as one flat vector (row-major, in list order). */
export function flattenTensors(tensors: readonly tf.Tensor[]): tf.Tensor1D {
  const flat = tensors.map((t) => (t.rank === 1 ? t : tf.reshape(t, [-1])));
  return (flat.length === 1 ? flat[0] : tf.concat(flat)) as tf.Tensor1D;
}

export class Adam {
  readonly beta1: number;
  readonly beta2: number;
  readonly epsilon: number;
  learningRate: number;
  /** Number of updates applied so far. */
  t = 0;
  /** Flat first and second moments, [total parameter count]. */
  private readonly m: tf.Variable;
  private readonly v: tf.Variable;
  private readonly sizes: number[];
  private readonly offsets: number[];
  private readonly total: number;

  constructor(private readonly vars: tf.Variable[], private readonly names: string[], settings: AdamSettings) {
    if (!(settings.learningRate > 0) || !Number.isFinite(settings.learningRate)) {
      throw new Error(`The learning rate must be a positive number; got ${settings.learningRate}.`);
    }
    this.learningRate = settings.learningRate;
    this.beta1 = settings.beta1 ?? 0.9;
    this.beta2 = settings.beta2 ?? 0.999;
    this.epsilon = settings.epsilon ?? 1e-8;
    this.sizes = vars.map((v) => v.size);
    this.offsets = [];
    let offset = 0;
    for (const s of this.sizes) {
      this.offsets.push(offset);
      offset += s;
    }
    this.total = offset;
    this.m = tf.tidy(() => tf.variable(tf.zeros([this.total]), false));
    this.v = tf.tidy(() => tf.variable(tf.zeros([this.total]), false));
  }

  /** Applies one update with the given gradients (same order as the variables). */
  apply(grads: tf.Tensor[]): void {
    tf.tidy(() => {
      this.applyFlat(flattenTensors(grads));
    });
  }

  /**
   * Applies one update with the flat gradient (the variables' gradients laid end to end, as `flattenTensors`
   * gives them). Returns the flat weights before the update, kept outside any tidy (dispose it when done), when
   * `keepPrevious` is set; null otherwise. Call inside a tf.tidy.
   */
  applyFlat(grad: tf.Tensor1D, keepPrevious = false): tf.Tensor1D | null {
    if (grad.size !== this.total) throw new Error(`Internal error: ${grad.size} gradient values for ${this.total} weights.`);
    this.t += 1;
    const c1 = 1 - Math.pow(this.beta1, this.t);
    const c2 = 1 - Math.pow(this.beta2, this.t);
    const stepSize = this.learningRate / c1;
    this.m.assign(tf.add(tf.mul(this.m, this.beta1), tf.mul(grad, 1 - this.beta1)));
    this.v.assign(tf.add(tf.mul(this.v, this.beta2), tf.mul(tf.square(grad), 1 - this.beta2)));
    const denom = tf.add(tf.sqrt(tf.div(this.v, c2)), this.epsilon);
    // A new tensor even when there is a single flat variable (keeping the variable itself would let it be disposed).
    const before = this.vars.length === 1 && this.vars[0]?.rank === 1 ? (tf.clone(this.vars[0]) as tf.Tensor1D) : flattenTensors(this.vars);
    this.setFlatWeights(tf.sub(before, tf.mul(tf.div(this.m, denom), stepSize)) as tf.Tensor1D);
    return keepPrevious ? tf.keep(before) : null;
  }

  /** Sets every variable from one flat vector (the layout of `applyFlat`). */
  setFlatWeights(flat: tf.Tensor1D): void {
    tf.tidy(() => {
      const pieces = this.vars.length === 1 ? [flat] : tf.split(flat, this.sizes);
      this.vars.forEach((variable, i) => {
        const piece = pieces[i] as tf.Tensor;
        variable.assign(variable.rank === 1 ? piece : tf.reshape(piece, variable.shape));
      });
    });
  }

  /** Moment estimates as `m/<name>`, `v/<name>` plus the update count `t` (a 1-element tensor). */
  getState(): NamedWeights {
    const out: NamedWeights = { t: { shape: [1], values: Float32Array.of(this.t) } };
    const m = this.m.dataSync() as Float32Array;
    const v = this.v.dataSync() as Float32Array;
    this.names.forEach((name, i) => {
      const shape = (this.vars[i] as tf.Variable).shape.slice();
      const a = this.offsets[i] as number;
      const b = a + (this.sizes[i] as number);
      out[`m/${name}`] = { shape, values: m.slice(a, b) };
      out[`v/${name}`] = { shape: shape.slice(), values: v.slice(a, b) };
    });
    return out;
  }

  /** Restores a state from `getState`; validates every tensor first so a bad state changes nothing. */
  setState(state: NamedWeights): void {
    const t = state['t'];
    if (!t || t.values.length !== 1 || !Number.isInteger(t.values[0]) || (t.values[0] as number) < 0) {
      throw new Error('The optimiser state has no valid update count "t"; it does not come from this trainer.');
    }
    this.names.forEach((name, i) => {
      for (const key of [`m/${name}`, `v/${name}`]) {
        const w = state[key];
        const size = this.sizes[i] as number;
        if (!w || w.values.length !== size) {
          throw new Error(`The optimiser state lacks "${key}" with ${size} values; it was saved for different model settings.`);
        }
      }
    });
    const m = new Float32Array(this.total);
    const v = new Float32Array(this.total);
    this.names.forEach((name, i) => {
      m.set((state[`m/${name}`] as NamedWeights[string]).values, this.offsets[i]);
      v.set((state[`v/${name}`] as NamedWeights[string]).values, this.offsets[i]);
    });
    this.t = t.values[0] as number;
    tf.tidy(() => {
      this.m.assign(tf.tensor1d(m));
      this.v.assign(tf.tensor1d(v));
    });
  }

  /** The moments (kept outside any tidy) for a roll-back; dispose them when done (two clones, which share data). */
  snapshot(): { t: number; m: tf.Tensor[]; v: tf.Tensor[] } {
    return { t: this.t, m: [tf.keep(this.m.clone())], v: [tf.keep(this.v.clone())] };
  }

  restore(s: { t: number; m: tf.Tensor[]; v: tf.Tensor[] }): void {
    this.t = s.t;
    this.m.assign(s.m[0] as tf.Tensor);
    this.v.assign(s.v[0] as tf.Tensor);
  }

  dispose(): void {
    this.m.dispose();
    this.v.dispose();
  }
}
