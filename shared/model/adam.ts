/**
 * Adam (Kingma & Ba 2015) with bias correction, written in TF.js ops so its state is plain named tensors that
 * a checkpoint can store and a resumed run can restore exactly. Updates run inside the caller's tf.tidy.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { NamedWeights } from './params';

export interface AdamSettings {
  learningRate: number;
  beta1?: number;
  beta2?: number;
  epsilon?: number;
}

export class Adam {
  readonly beta1: number;
  readonly beta2: number;
  readonly epsilon: number;
  learningRate: number;
  /** Number of updates applied so far. */
  t = 0;
  private readonly m: tf.Variable[];
  private readonly v: tf.Variable[];

  constructor(private readonly vars: tf.Variable[], private readonly names: string[], settings: AdamSettings) {
    if (!(settings.learningRate > 0) || !Number.isFinite(settings.learningRate)) {
      throw new Error(`The learning rate must be a positive number; got ${settings.learningRate}.`);
    }
    this.learningRate = settings.learningRate;
    this.beta1 = settings.beta1 ?? 0.9;
    this.beta2 = settings.beta2 ?? 0.999;
    this.epsilon = settings.epsilon ?? 1e-8;
    this.m = vars.map((v) => tf.variable(tf.zerosLike(v), false));
    this.v = vars.map((v) => tf.variable(tf.zerosLike(v), false));
  }

  /** Applies one update with the given gradients (same order as the variables). */
  apply(grads: tf.Tensor[]): void {
    this.t += 1;
    const c1 = 1 - Math.pow(this.beta1, this.t);
    const c2 = 1 - Math.pow(this.beta2, this.t);
    const stepSize = this.learningRate / c1;
    tf.tidy(() => {
      this.vars.forEach((variable, i) => {
        const g = grads[i] as tf.Tensor;
        const m = this.m[i] as tf.Variable;
        const v = this.v[i] as tf.Variable;
        m.assign(tf.add(tf.mul(m, this.beta1), tf.mul(g, 1 - this.beta1)));
        v.assign(tf.add(tf.mul(v, this.beta2), tf.mul(tf.square(g), 1 - this.beta2)));
        const denom = tf.add(tf.sqrt(tf.div(v, c2)), this.epsilon);
        variable.assign(tf.sub(variable, tf.mul(tf.div(m, denom), stepSize)));
      });
    });
  }

  /** Moment estimates as `m/<name>`, `v/<name>` plus the update count `t` (a 1-element tensor). */
  getState(): NamedWeights {
    const out: NamedWeights = { t: { shape: [1], values: Float32Array.of(this.t) } };
    this.names.forEach((name, i) => {
      const m = this.m[i] as tf.Variable;
      const v = this.v[i] as tf.Variable;
      out[`m/${name}`] = { shape: m.shape.slice(), values: Float32Array.from(m.dataSync() as Float32Array) };
      out[`v/${name}`] = { shape: v.shape.slice(), values: Float32Array.from(v.dataSync() as Float32Array) };
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
        const size = (this.vars[i] as tf.Variable).size;
        if (!w || w.values.length !== size) {
          throw new Error(`The optimiser state lacks "${key}" with ${size} values; it was saved for different model settings.`);
        }
      }
    });
    this.t = t.values[0] as number;
    this.names.forEach((name, i) => {
      const shape = (this.vars[i] as tf.Variable).shape;
      tf.tidy(() => {
        (this.m[i] as tf.Variable).assign(tf.tensor((state[`m/${name}`] as NamedWeights[string]).values, shape));
        (this.v[i] as tf.Variable).assign(tf.tensor((state[`v/${name}`] as NamedWeights[string]).values, shape));
      });
    });
  }

  /** Copies of the moment tensors (kept outside any tidy) for a roll-back; dispose them when done. */
  snapshot(): { t: number; m: tf.Tensor[]; v: tf.Tensor[] } {
    return { t: this.t, m: this.m.map((x) => tf.keep(x.clone())), v: this.v.map((x) => tf.keep(x.clone())) };
  }

  restore(s: { t: number; m: tf.Tensor[]; v: tf.Tensor[] }): void {
    this.t = s.t;
    this.m.forEach((x, i) => x.assign(s.m[i] as tf.Tensor));
    this.v.forEach((x, i) => x.assign(s.v[i] as tf.Tensor));
  }

  dispose(): void {
    for (const x of [...this.m, ...this.v]) x.dispose();
  }
}
