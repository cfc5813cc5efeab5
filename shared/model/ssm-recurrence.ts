/**
 * The part of the log-weight (MODEL.md sections 4 and 5) that runs step by step: the proposal
 * q(xi_t | h_{t-1}, b_t) and the inference flow h_t = f_q(h_{t-1}, xi_t), as one differentiable op with a
 * hand-written gradient (`tf.customGrad`). The forward loop is not recorded on the gradient tape; the backward
 * loop carries the gradient of h_t back through the steps with a few kernels per step, and every weight's
 * gradient is one matmul (or sum) over all steps. Everything that does not feed the next step (the generative
 * flow's inverse, the observation and Gaussian terms) is left to automatic differentiation on [T, N, .] stacks.
 *
 * Per step, with pre = h_{t-1} W + bias_t = [pre_q, ctxPre of each inference-flow layer]:
 *   a = tanh(pre_q);  [m, p] = a W2 + b2;  s = softplus(p) + 1e-4;  xi = m + s eps_t;  h_t = f_q(ctxPre, xi)
 *   L_t = sum log s + logdet f_q     (output beside h_t: [T, N, d + 1])
 * Backward, with g = (gradient reaching h_t) + (gradient from step t+1 through h_t W), dL = gradient reaching L_t:
 *   dxi, d ctxPre from the flow layers in reverse (`flows/forward-grads.ts`);  d m = dxi;
 *   d p = (dxi eps + dL / s) sigmoid(p);  d pre_q = ([d m, d p] W2^T)(1 - a^2)   (the proposal is a diag layer on
 *   the noise, z = eps: these are that layer's backward pass in `flows/forward-grads.ts`, without d eps);
 *   gradient to h_{t-1}: [d pre_q, d ctxPre...] W^T;  d W = sum_t h_{t-1}^T d pre_t;  d bias_t = d pre_t.
 * Checked against automatic differentiation of the step-by-step code in `ssm-recurrence.spec.ts`.
 */
import * as tf from '@tensorflow/tfjs-core';
import { boundedScale } from './flows/conditioner';
import type { ForwardParts } from './flows/flow-layer';
import { forwardStepper, layerBackward, stackCount, stackedLogdet } from './flows/forward-grads';

export interface RecurrenceInputs {
  /** The initial state repeated for every row, [N, d]. */
  h0: tf.Tensor2D;
  /** [d, P + widths of the flow layers]: the proposal's and every flow layer's first-layer weights on h_{t-1}. */
  w: tf.Tensor2D;
  /** Per-step first-layer terms that do not depend on h_{t-1} (biases, the proposal's b_t input), [T, N, same]. */
  bias: tf.Tensor3D;
  /** The proposal's second layer, [P, 2d] and [2d]. */
  w2: tf.Tensor2D;
  b2: tf.Tensor1D;
  /** Standard normal noise of the reparameterised proposal, [T, N, d] (no gradient). */
  eps: tf.Tensor3D;
  /** The inference flow's layers (their `weights` are inputs of the op). */
  layers: ForwardParts[];
  /** Width of each flow layer's ctxPre (the flow's hidden width). */
  layerWidth: number;
}

/** [T, N, d + 1]: h_1..h_T and, in the last column, L_t = sum log s_t + logdet f_q at each step. */
export function proposalRecurrence(x: RecurrenceInputs): tf.Tensor3D {
  const [T, N, d] = x.eps.shape;
  const P = x.w2.shape[0];
  // The proposal is a diag layer on the noise (xi = m + s eps, [m, p] = tanh(pre_q) W2 + b2, s = softplus(p) + 1e-4).
  const proposal: ForwardParts = { kind: 'diag', dim: d, weights: [x.w2, x.b2] };
  const splits = [P, ...x.layers.map(() => x.layerWidth)];
  const counts = x.layers.map((l) => l.weights.length);
  const layerWeights = (flat: tf.Tensor[]): tf.Tensor[][] => {
    let at = 0;
    return counts.map((c) => flat.slice(at, (at += c)));
  };
  const op = tf.customGrad((...args: Array<tf.Tensor | tf.GradSaveFunc>) => {
    const save = args[args.length - 1] as tf.GradSaveFunc;
    const [h0, w, bias, w2, b2, ...flat] = args.slice(0, -1) as [tf.Tensor2D, tf.Tensor2D, tf.Tensor3D, tf.Tensor2D, tf.Tensor1D, ...tf.Tensor[]];
    const lw = layerWeights(flat);
    const steppers = x.layers.map((parts, i) => forwardStepper(parts, lw[i] as tf.Tensor[]));
    const biasSteps = tf.unstack(bias) as tf.Tensor2D[];
    const noise = tf.unstack(x.eps) as tf.Tensor2D[];
    const kept: tf.Tensor2D[][] = [[], [], [], []]; // h_{t-1}, a, p, s
    const hs: tf.Tensor2D[] = [];
    // Without coupling layers every first layer's activation is tanh of its part of pre: one tanh for all.
    const tanhAll = x.layers.every((l) => l.kind !== 'coupling');
    let hPrev = h0;
    for (let t = 0; t < T; t++) {
      const pre = tf.add(tf.matMul(hPrev, w), biasSteps[t] as tf.Tensor2D) as tf.Tensor2D;
      // [pre_q, ctxPre...], or their tanh when every layer takes tanh(ctxPre) (then ctxPre itself is not needed).
      const [partQ, ...ctx] = tf.split(tanhAll ? tf.tanh(pre) : pre, splits, 1) as tf.Tensor2D[];
      const a = (tanhAll ? partQ : tf.tanh(partQ as tf.Tensor2D)) as tf.Tensor2D;
      const [m, p] = tf.split(tf.add(tf.matMul(a, w2), b2), 2, 1) as [tf.Tensor2D, tf.Tensor2D];
      const s = boundedScale(p) as tf.Tensor2D;
      let y = tf.add(m, tf.mul(s, noise[t] as tf.Tensor2D)) as tf.Tensor2D;
      steppers.forEach((st, i) => (y = st.forward(ctx[i] as tf.Tensor2D, y, tanhAll ? ctx[i] : undefined)));
      [hPrev, a, p, s].forEach((v, i) => kept[i]?.push(v));
      hs.push(y);
      hPrev = y;
    }
    const [HP, A, PQ, S] = kept.map((list) => tf.stack(list)) as tf.Tensor3D[];
    tf.dispose([...(kept[1] as tf.Tensor[]), ...(kept[2] as tf.Tensor[]), ...(kept[3] as tf.Tensor[])]); // a, p, s per step: only the stacks are used
    const layerStacks = steppers.map((st) => st.stacks());
    let logdets = stackedLogdet(proposal, [w2, b2], [A, PQ, S] as tf.Tensor3D[]) as tf.Tensor2D;
    x.layers.forEach((parts, i) => {
      const ld = stackedLogdet(parts, lw[i] as tf.Tensor[], layerStacks[i] as tf.Tensor3D[]);
      if (ld) logdets = tf.add(logdets, ld) as tf.Tensor2D;
    });
    save([HP, A, PQ, S, x.eps, w, w2, ...flat, ...layerStacks.flat()] as tf.Tensor[]);
    return {
      value: tf.concat([tf.stack(hs), tf.expandDims(logdets, 2)], 2) as tf.Tensor3D,
      gradFunc: (dy: tf.Tensor, saved: tf.Tensor[]) => backward(dy as tf.Tensor3D, saved),
    };
  });

  function backward(dy: tf.Tensor3D, saved: tf.Tensor[]): tf.Tensor[] {
    const [HP, A, PQ, S, EPS, w, w2] = saved as [tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor2D, tf.Tensor2D];
    const flat = saved.slice(7, 7 + counts.reduce((a, b) => a + b, 0));
    const lw = layerWeights(flat);
    let at = 7 + flat.length;
    const [dH, dL] = tf.split(dy, [d, 1], 2) as [tf.Tensor3D, tf.Tensor3D];
    const backs = x.layers.map((parts, i) => {
      const n = stackCount(parts);
      return layerBackward(parts, lw[i] as tf.Tensor[], saved.slice(at, (at += n)) as tf.Tensor3D[], dL);
    });
    // The proposal's backward pass as a diag layer's (its stacks [a, p, s, z = eps]), without a gradient for eps.
    // (A diag layer's backward reads only W2; b2 is not saved, which would cost a copy.)
    const proposalBack = layerBackward(proposal, [w2, x.b2], [A, PQ, S, EPS], dL, false);
    const dHs = tf.unstack(dH) as tf.Tensor2D[];
    const wT = tf.transpose(w);
    const dPres: tf.Tensor2D[] = new Array(T);
    let carry: tf.Tensor2D | null = null;
    for (let t = T - 1; t >= 0; t--) {
      let g = (carry ? tf.add(dHs[t] as tf.Tensor2D, carry) : dHs[t]) as tf.Tensor2D;
      const dCtx: tf.Tensor2D[] = new Array(backs.length);
      for (let i = backs.length - 1; i >= 0; i--) {
        const r = (backs[i] as ReturnType<typeof layerBackward>).step(t, g);
        g = r.dz as tf.Tensor2D; // flow layers: always computed
        dCtx[i] = r.dCtx;
      }
      const dPreQ = proposalBack.step(t, g).dCtx;
      const dPre = (dCtx.length ? tf.concat([dPreQ, ...dCtx], 1) : dPreQ) as tf.Tensor2D;
      dPres[t] = dPre;
      carry = tf.matMul(dPre, wT) as tf.Tensor2D;
    }
    const rows = (t: tf.Tensor, c: number) => tf.reshape(t, [T * N, c]) as tf.Tensor2D;
    const dPre = tf.stack(dPres) as tf.Tensor3D;
    const C = dPre.shape[2];
    return [
      carry as tf.Tensor2D,
      tf.matMul(rows(HP, d), rows(dPre, C), true, false),
      dPre,
      ...proposalBack.weightGrads(),
      ...backs.flatMap((b) => b.weightGrads()),
    ];
  }

  return op(x.h0, x.w, x.bias, x.w2, x.b2, ...x.layers.flatMap((l) => l.weights)) as tf.Tensor3D;
}
