"""A PyTorch twin of Noisewright's stochastic state-space model and its training step.

Written from the equations in docs/MODEL.md (sections 2-5 and 8), not translated from the TF.js code: flows are
applied with their literal masked formulas, the Gaussian terms are full log-densities, the triangular inverse
uses torch.linalg.solve_triangular, the optimiser is torch.optim.Adam. It reads the product's weights by their
checkpoint names (see shared/model/CHECKPOINT-FORMAT.md), so both start from the same numbers.
"""
import math

import torch
import torch.nn.functional as F

SCALE_FLOOR = 1e-4  # every softplus scale is softplus(.) + 1e-4 (docs/MODEL.md section 3 and 8)
HALF_LOG_2PI = 0.5 * math.log(2 * math.pi)


def bounded_scale(pre):
    return F.softplus(pre) + SCALE_FLOOR


def log_normal_std(x):
    """log N(x; 0, I) summed over the last axis."""
    return (-0.5 * x * x - HALF_LOG_2PI).sum(-1)


def log_normal(x, mean, std):
    """log N(x; mean, diag(std^2)) summed over the last axis."""
    u = (x - mean) / std
    return (-0.5 * u * u - torch.log(std) - HALF_LOG_2PI).sum(-1)


class Layer:
    """One flow layer conditioned on c = h_{t-1}; `p(name)` looks up this layer's weights."""

    def __init__(self, kind, p, dim, parity):
        self.kind, self.p, self.dim = kind, p, dim
        if kind == 'coupling':
            # Parity 0 keeps the first floor(d/2) entries, parity 1 the others; alternates across coupling layers.
            half = dim // 2
            keep = [1.0 if ((i < half) == (parity % 2 == 0)) else 0.0 for i in range(dim)]
            self.mask = torch.tensor(keep, dtype=p('net.w1').dtype)

    def _net(self, prefix, x):
        p = self.p
        return torch.tanh(x @ p(prefix + 'w1') + p(prefix + 'b1')) @ p(prefix + 'w2') + p(prefix + 'b2')

    def _diag_parts(self, c):
        out = self._net('net.', c)
        d = self.dim
        return out[:, :d], bounded_scale(out[:, d:2 * d]), out[:, 2 * d:]

    def _lower_matrix(self, sigma, lower):
        """L = diag(sigma) + strictly-lower entries in row-major order (i, j < i)."""
        n, d = sigma.shape
        rows, cols = torch.tril_indices(d, d, offset=-1)
        L = torch.diag_embed(sigma)
        if lower.shape[1] > 0:
            L = L.index_put((torch.arange(n).repeat_interleave(lower.shape[1]), rows.repeat(n), cols.repeat(n)),
                            lower.reshape(-1), accumulate=True)
        return L

    def _coupling(self, c, x):
        m = self.mask
        d = self.dim
        out = self._net('net.', torch.cat([m * x, c], 1))
        s = torch.tanh(out[:, :d]) * self.p('scale')
        return s, out[:, d:]

    def forward(self, c, z):
        if self.kind == 'shift':
            return z + self._net('mu.', c), torch.zeros(z.shape[0], dtype=z.dtype)
        if self.kind == 'coupling':
            m = self.mask
            s, t = self._coupling(c, z)
            return m * z + (1 - m) * (z * torch.exp(s) + t), ((1 - m) * s).sum(1)
        mu, sigma, lower = self._diag_parts(c)
        if self.kind == 'diag':
            return mu + sigma * z, torch.log(sigma).sum(1)
        L = self._lower_matrix(sigma, lower)
        return mu + (L @ z.unsqueeze(2)).squeeze(2), torch.log(sigma).sum(1)

    def inverse(self, c, y):
        if self.kind == 'shift':
            return y - self._net('mu.', c), torch.zeros(y.shape[0], dtype=y.dtype)
        if self.kind == 'coupling':
            m = self.mask
            s, t = self._coupling(c, y)  # m * y equals m * z
            return m * y + (1 - m) * ((y - t) * torch.exp(-s)), -((1 - m) * s).sum(1)
        mu, sigma, lower = self._diag_parts(c)
        if self.kind == 'diag':
            return (y - mu) / sigma, -torch.log(sigma).sum(1)
        L = self._lower_matrix(sigma, lower)
        z = torch.linalg.solve_triangular(L, (y - mu).unsqueeze(2), upper=False).squeeze(2)
        return z, -torch.log(sigma).sum(1)


class Flow:
    """A stack of layers: forward in order, inverse backwards; log-determinants add."""

    def __init__(self, spec, params, prefix, dim):
        self.layers = []
        couplings = 0
        for i, layer in enumerate(spec):
            kind = layer['kind']
            name = f'{prefix}{i}.{kind}.'
            self.layers.append(Layer(kind, (lambda n, name=name: params[name + n]), dim, couplings))
            if kind == 'coupling':
                couplings += 1

    def forward(self, c, z):
        total = 0
        for layer in self.layers:
            z, ld = layer.forward(c, z)
            total = total + ld
        return z, total

    def inverse(self, c, y):
        total = 0
        for layer in reversed(self.layers):
            y, ld = layer.inverse(c, y)
            total = total + ld
        return y, total


class SsmTwin:
    def __init__(self, settings, weights, dtype=torch.float32):
        self.s = settings
        self.params = {}
        for name in sorted(weights):
            w = weights[name]
            self.params[name] = torch.tensor(w['values'], dtype=dtype).reshape(w['shape']).requires_grad_(True)
        d = settings['stateSize']
        self.gen = Flow(settings['generativeFlow'], self.params, 'gen/', d)
        self.inf = Flow(settings['inferenceFlow'], self.params, 'inf/', d)
        self.dtype = dtype

    @property
    def parameters(self):
        return [self.params[n] for n in sorted(self.params)]

    def observation_log_probs(self, h):
        p = self.params
        if self.s['observationHidden'] > 0:
            logits = torch.tanh(h @ p['obs.w1'] + p['obs.b1']) @ p['obs.w2'] + p['obs.b2']
        else:
            logits = h @ p['obs.w'] + p['obs.b']
        return torch.log_softmax(logits, -1)

    def encode_backward(self, ids, mask):
        """Backward GRU over the embedded word: b_t summarises w_t..w_T; padded steps keep the zero state.
        Gates in column blocks reset | update | candidate; the reset gate multiplies (h W_hn + b_hn)."""
        p = self.params
        B, T = ids.shape
        H = self.s['encoderSize']
        emb = p['enc.embed'][ids]  # [B, T, E]
        x = emb @ p['enc.wx'] + p['enc.bx']  # [B, T, 3H]
        b = torch.zeros(B, H, dtype=self.dtype)
        out = [None] * T
        for t in range(T - 1, -1, -1):
            hx = b @ p['enc.wh'] + p['enc.bh']
            xt = x[:, t]
            r = torch.sigmoid(xt[:, :H] + hx[:, :H])
            u = torch.sigmoid(xt[:, H:2 * H] + hx[:, H:2 * H])
            n = torch.tanh(xt[:, 2 * H:] + r * hx[:, 2 * H:])
            new = (1 - u) * n + u * b
            m = mask[:, t:t + 1]
            b = m * new + (1 - m) * b
            out[t] = b
        return torch.stack(out, 0)  # [T, B, H]

    def log_weights(self, ids, mask, eps):
        """log W [B, K] (docs/MODEL.md section 5) for noise eps [T, K*B, d]; row k*B + b is sample k of word b."""
        p = self.params
        B, T = ids.shape
        N, d = eps.shape[1], eps.shape[2]
        K = N // B
        enc = self.encode_backward(ids, mask)  # [T, B, H]
        enc_proj = enc @ p['prop.wb'] + p['prop.b1']  # [T, B, P]
        h = p['h0'].expand(N, d)
        log_obs_terms, latent_terms = [], []
        for t in range(T):
            pre = (h @ p['prop.wh']).reshape(K, B, -1) + enc_proj[t]
            out = torch.tanh(pre.reshape(N, -1)) @ p['prop.w2'] + p['prop.b2']
            mean, std = out[:, :d], bounded_scale(out[:, d:])
            xi = mean + std * eps[t]
            h_new, logdet_q = self.inf.forward(h, xi)  # h_t = f_q(h_{t-1}, xi_t)
            e, logdet_g = self.gen.inverse(h, h_new)  # eps_t = f_g^{-1}(h_t; h_{t-1})
            latent_terms.append(log_normal_std(e) + logdet_g - log_normal(xi, mean, std) + logdet_q)
            h = h_new
            log_obs_terms.append(h)
        hs = torch.stack(log_obs_terms, 0)  # [T, N, d]
        logp = self.observation_log_probs(hs)  # [T, N, V]
        target = ids.t().repeat(1, K)  # [T, N]
        log_obs = logp.gather(2, target.unsqueeze(2)).squeeze(2)  # [T, N]
        per_step = (log_obs + torch.stack(latent_terms, 0)) * mask.t().repeat(1, K)
        return per_step.sum(0).reshape(K, B).t()

    def loss(self, ids, mask, eps):
        """Minus the mean IWAE bound L_K = logsumexp_k log W_k - log K over the batch (nats per word)."""
        log_w = self.log_weights(ids, mask, eps)
        return -(torch.logsumexp(log_w, 1) - math.log(log_w.shape[1])).mean()


class TwinTrainer:
    """Adam on minus the mean L_K, gradients clipped to a global norm (min(1, clip / norm))."""

    def __init__(self, twin, learning_rate, clip_norm):
        self.twin = twin
        self.clip = clip_norm
        self.opt = torch.optim.Adam(twin.parameters, lr=learning_rate, betas=(0.9, 0.999), eps=1e-8)

    def step(self, ids, mask, eps):
        self.opt.zero_grad(set_to_none=True)
        loss = self.twin.loss(ids, mask, eps)
        loss.backward()
        grads = [q.grad for q in self.twin.parameters]
        norm = torch.sqrt(sum((g * g).sum() for g in grads))
        loss_value, norm_value = torch.stack([loss.detach(), norm]).tolist()
        if not (math.isfinite(loss_value) and math.isfinite(norm_value)):
            raise FloatingPointError('The twin\'s loss or gradient norm is not finite.')
        factor = min(1.0, self.clip / max(norm_value, 1e-12)) if self.clip > 0 else 1.0
        if factor < 1:
            for g in grads:
                g.mul_(factor)
        self.opt.step()
        return loss_value, norm_value
