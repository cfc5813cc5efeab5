/**
 * The GRU baseline's teacher-forced recurrence (MODEL.md section 6; Cho et al. 2014, the reset gate applied to
 * h before the recurrent matmul) over a whole batch as one differentiable op with a hand-written gradient
 * (`tf.customGrad`): the forward loop is not recorded on the gradient tape, the backward loop does a few kernels
 * per step, and the weight gradients are one matmul each over all steps.
 *
 * Per step, with h the previous state and x_t = [x_z, x_r, x_c] (input projections with their bias):
 *   [z, r] = sigm([x_z, x_r] + h Uzr);  c = tanh(x_c + (r h) Uh);  h' = z h + (1 - z) c
 * Backward, with g the gradient reaching h' (its own output gradient plus the gradient from step t+1):
 *   d pre_z = g (h - c) z (1 - z);  d pre_c = g (1 - z)(1 - c^2);  e = d pre_c Uh^T;  d pre_r = e h r (1 - r)
 *   d h = g z + e r + [d pre_z, d pre_r] Uzr^T;  d x_t = [d pre_z, d pre_r, d pre_c]
 *   d Uzr = sum_t h^T [d pre_z, d pre_r];  d Uh = sum_t (r h)^T d pre_c.
 * Checked against automatic differentiation of the step-by-step loop in `gru-lm-sequence.spec.ts`.
 */
import * as tf from '@tensorflow/tfjs-core';

/**
 * States h_1..h_T, time-major [T, B, d]. `x`: input projections [T, B, 3d] (update | reset | candidate);
 * `h0`: [B, d]; `uzr`: [d, 2d]; `uh`: [d, d].
 */
export function gruLmSequence(x: tf.Tensor3D, h0: tf.Tensor2D, uzr: tf.Tensor2D, uh: tf.Tensor2D): tf.Tensor3D {
  const [T, B, D3] = x.shape;
  const d = D3 / 3;
  const run = tf.customGrad((...args: Array<tf.Tensor | tf.GradSaveFunc>) => {
    const [xs, h0In, wzr, wh, save] = args as [tf.Tensor3D, tf.Tensor2D, tf.Tensor2D, tf.Tensor2D, tf.GradSaveFunc];
    const [xzr, xc] = tf.split(xs, [2 * d, d], 2) as [tf.Tensor3D, tf.Tensor3D];
    const xzrs = tf.unstack(xzr) as tf.Tensor2D[];
    const xcs = tf.unstack(xc) as tf.Tensor2D[];
    const kept: tf.Tensor2D[][] = [[], [], [], [], []]; // h, z, r, c, r h
    const out: tf.Tensor2D[] = [];
    let h = h0In;
    for (let t = 0; t < T; t++) {
      const [z, r] = tf.split(tf.sigmoid(tf.add(xzrs[t] as tf.Tensor2D, tf.matMul(h, wzr))), 2, 1) as [tf.Tensor2D, tf.Tensor2D];
      const rh = tf.mul(r, h) as tf.Tensor2D;
      const c = tf.tanh(tf.add(xcs[t] as tf.Tensor2D, tf.matMul(rh, wh))) as tf.Tensor2D;
      [h, z, r, c, rh].forEach((v, i) => kept[i]?.push(v));
      h = tf.add(tf.mul(z, h), tf.mul(tf.sub(1, z), c)) as tf.Tensor2D;
      out.push(h);
    }
    const stacks = kept.map((list) => tf.stack(list)) as tf.Tensor3D[];
    tf.dispose(kept.slice(1).flat()); // z, r, c, r h per step: only the stacks are used (h are the outputs and h0)
    save([...stacks, wzr, wh]);
    return {
      value: tf.stack(out) as tf.Tensor3D,
      gradFunc: (dy: tf.Tensor, saved: tf.Tensor[]) => {
        const [H, Z, R, C, RH, Wzr, Wh] = saved as [tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor2D, tf.Tensor2D];
        // Per-step coefficients for all steps at once.
        const oneMinusZ = tf.sub(1, Z);
        const cz = tf.unstack(tf.mul(tf.sub(H, C), tf.mul(Z, oneMinusZ))) as tf.Tensor2D[];
        const cc = tf.unstack(tf.mul(oneMinusZ, tf.sub(1, tf.square(C)))) as tf.Tensor2D[];
        const cr = tf.unstack(tf.mul(H, tf.mul(R, tf.sub(1, R)))) as tf.Tensor2D[];
        const zs = tf.unstack(Z) as tf.Tensor2D[];
        const rs = tf.unstack(R) as tf.Tensor2D[];
        const dys = tf.unstack(dy) as tf.Tensor2D[];
        const [wzrT, whT] = [tf.transpose(Wzr), tf.transpose(Wh)];
        const dzr: tf.Tensor2D[] = new Array(T);
        const dc: tf.Tensor2D[] = new Array(T);
        let carry: tf.Tensor2D | null = null;
        for (let t = T - 1; t >= 0; t--) {
          const g = (carry ? tf.add(dys[t] as tf.Tensor2D, carry) : dys[t]) as tf.Tensor2D;
          const dPreC = tf.mul(g, cc[t] as tf.Tensor2D) as tf.Tensor2D;
          const e = tf.matMul(dPreC, whT);
          const dPreZr = tf.concat([tf.mul(g, cz[t] as tf.Tensor2D), tf.mul(e, cr[t] as tf.Tensor2D)], 1) as tf.Tensor2D;
          dzr[t] = dPreZr;
          dc[t] = dPreC;
          carry = tf.add(tf.add(tf.mul(g, zs[t] as tf.Tensor2D), tf.mul(e, rs[t] as tf.Tensor2D)), tf.matMul(dPreZr, wzrT)) as tf.Tensor2D;
        }
        const DZR = tf.stack(dzr) as tf.Tensor3D;
        const DC = tf.stack(dc) as tf.Tensor3D;
        const rows = (t: tf.Tensor, c: number) => tf.reshape(t, [T * B, c]) as tf.Tensor2D;
        return [
          tf.concat([DZR, DC], 2),
          carry as tf.Tensor2D,
          tf.matMul(rows(H, d), rows(DZR, 2 * d), true, false),
          tf.matMul(rows(RH, d), rows(DC, d), true, false),
        ];
      },
    };
  });
  return run(x, h0, uzr, uh) as tf.Tensor3D;
}
