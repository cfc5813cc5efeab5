/**
 * The inference network's backward GRU over a whole word batch as one differentiable op with a hand-written
 * gradient (`tf.customGrad`). Same equations as `gruStep` (Cho et al. 2014, reset gate on the recurrent
 * projection) plus the padding mask; what changes is the kernel count: the forward loop is not recorded on the
 * gradient tape (no saved copies per op), the backward loop does six kernels per step, and the weight gradients
 * are one matmul and one sum over all steps.
 *
 * Per step t (from T-1 down to 0), with b the state after step t+1 (0 before the last step) and m_t the mask:
 *   hp = b Wh + bh = [hp_r, hp_u, hp_n];  r = sigm(x_r + hp_r);  u = sigm(x_u + hp_u);  n = tanh(x_n + r * hp_n)
 *   b_t = b + m_t (1 - u)(n - b)      (= b + m_t (gruStep(x, b) - b))
 * Backward, with g the gradient reaching b_t (its own output gradient plus the gradient from step t-1):
 *   d pre_n = g a (1 - n^2) with a = m_t (1 - u);  d x_n = d pre_n;  d hp_n = d pre_n r
 *   d pre_r = d pre_n hp_n r (1 - r);  d pre_u = -g m_t (n - b) u (1 - u);  d x_{r,u} = d hp_{r,u} = d pre_{r,u}
 *   d b = g (1 - a) + d hp Wh^T;   d Wh = sum_t b^T d hp;   d bh = sum_t d hp.
 * Checked against automatic differentiation of the step-by-step loop in `gru-sequence.spec.ts`.
 */
import * as tf from '@tensorflow/tfjs-core';
import { columnSums } from './bias-add';

/** Added (negated) to the update gate's pre-activation on padded steps: sigm(-PAD) is exactly 0 in float32. */
const PAD = 1e4;

/**
 * States b_t of the backward GRU, time-major [T, B, H]. `xProj`: input projections x Wx + bx, [T, B, 3H]
 * (reset | update | candidate); `mask`: [T, B, 1] (1 on characters, 0 on padding); `wh`: [H, 3H]; `bh`: [3H].
 */
export function backwardGruSequence(xProj: tf.Tensor3D, mask: tf.Tensor3D, wh: tf.Tensor2D, bh: tf.Tensor1D): tf.Tensor3D {
  const [T, B, H3] = xProj.shape;
  const H = H3 / 3;
  const run = tf.customGrad((...args: Array<tf.Tensor | tf.GradSaveFunc>) => {
    const [x, w, bias, save] = args as [tf.Tensor3D, tf.Tensor2D, tf.Tensor1D, tf.GradSaveFunc];
    // The loop computes a = m (1 - u) directly as sigm(-pre_u - PAD (1 - m)): the update gate's columns are
    // negated (sigm(-v) = 1 - sigm(v)) and padded steps are pushed to exactly 0 (sigm(-1e4) = 0 in float32).
    // Both as constant rows [3H] broadcast over the steps: `sign` (-1 on the update gate's columns) and `padRow`
    // (PAD there, 0 elsewhere), so the push is (m - 1) padRow, [T, B, 1] x [3H].
    const isUpdate = (i: number) => i >= H && i < 2 * H;
    const sign = tf.tensor1d(Array.from({ length: H3 }, (_, i) => (isUpdate(i) ? -1 : 1)));
    const padRow = tf.tensor1d(Array.from({ length: H3 }, (_, i) => (isUpdate(i) ? PAD : 0)));
    const [xru, xn] = tf.split(tf.add(tf.mul(x, sign), tf.mul(tf.sub(mask, 1), padRow)), [2 * H, H], 2);
    const wSigned = tf.mul(w, sign);
    const biasSigned = tf.mul(bias, sign);
    const xrus = tf.unstack(xru as tf.Tensor) as tf.Tensor2D[];
    const xns = tf.unstack(xn as tf.Tensor) as tf.Tensor2D[];
    let b = tf.zeros([B, H]) as tf.Tensor2D;
    const prev: tf.Tensor2D[] = new Array(T);
    const rs: tf.Tensor2D[] = new Array(T);
    const as: tf.Tensor2D[] = new Array(T);
    const ns: tf.Tensor2D[] = new Array(T);
    const hpns: tf.Tensor2D[] = new Array(T);
    const out: tf.Tensor2D[] = new Array(T);
    for (let t = T - 1; t >= 0; t--) {
      const hp = tf.add(tf.matMul(b, wSigned), biasSigned);
      const [hpru, hpn] = tf.split(hp, [2 * H, H], 1) as [tf.Tensor2D, tf.Tensor2D];
      const [r, a] = tf.split(tf.sigmoid(tf.add(xrus[t] as tf.Tensor2D, hpru)), 2, 1) as [tf.Tensor2D, tf.Tensor2D];
      const n = tf.tanh(tf.add(xns[t] as tf.Tensor2D, tf.mul(r, hpn))) as tf.Tensor2D;
      const next = tf.add(b, tf.mul(a, tf.sub(n, b))) as tf.Tensor2D;
      prev[t] = b;
      rs[t] = r;
      as[t] = a;
      ns[t] = n;
      hpns[t] = hpn;
      out[t] = next;
      b = next;
    }
    const [P, R, A, N, HPN] = [prev, rs, as, ns, hpns].map((list) => tf.stack(list)) as tf.Tensor3D[];
    save([P as tf.Tensor3D, R as tf.Tensor3D, A as tf.Tensor3D, N as tf.Tensor3D, HPN as tf.Tensor3D, w]);
    return {
      value: tf.stack(out) as tf.Tensor3D,
      gradFunc: (dy: tf.Tensor, saved: tf.Tensor[]) => {
        const [Pv, Rv, Av, Nv, HPNv, Wv] = saved as [tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor3D, tf.Tensor2D];
        // Per-step coefficients for all steps at once: d pre = g * coefficient.
        const a = Av; // m (1 - u)
        const cn = tf.mul(a, tf.sub(1, tf.square(Nv)));
        const cr = tf.mul(tf.mul(cn, HPNv), tf.mul(Rv, tf.sub(1, Rv)));
        // -m (n - b) u (1 - u) = -(n - b) a (1 - a): m is 0 or 1, and a = 1 - u where m = 1, 0 where m = 0.
        const cu = tf.neg(tf.mul(tf.sub(Nv, Pv), tf.mul(Av, tf.sub(1, Av))));
        const cHp = tf.concat([cr, cu, tf.mul(cn, Rv)], 2); // d hp = g * cHp (g repeated three times)
        const cX = tf.concat([cr, cu, cn], 2); // d x = g * cX
        const cB = tf.unstack(tf.sub(1, a)) as tf.Tensor2D[];
        const cHps = tf.unstack(cHp) as tf.Tensor2D[];
        const dys = tf.unstack(dy) as tf.Tensor2D[];
        const whT = tf.transpose(Wv);
        const gs: tf.Tensor2D[] = new Array(T);
        let carry: tf.Tensor2D | null = null;
        for (let t = 0; t < T; t++) {
          const g = (carry ? tf.add(dys[t] as tf.Tensor2D, carry) : dys[t]) as tf.Tensor2D;
          gs[t] = g;
          if (t === T - 1) break; // the state entering the last step is the constant 0
          const dHp = tf.mul(tf.concat([g, g, g], 1), cHps[t] as tf.Tensor2D);
          carry = tf.add(tf.mul(g, cB[t] as tf.Tensor2D), tf.matMul(dHp, whT)) as tf.Tensor2D;
        }
        const G = tf.stack(gs);
        const G3 = tf.concat([G, G, G], 2);
        const dHpAll = tf.reshape(tf.mul(G3, cHp), [T * B, H3]);
        const dW = tf.matMul(tf.reshape(Pv, [T * B, H]), dHpAll, true, false);
        const dBias = columnSums(dHpAll as tf.Tensor2D);
        return [tf.mul(G3, cX), dW, dBias];
      },
    };
  });
  return run(xProj, wh, bh) as tf.Tensor3D;
}
