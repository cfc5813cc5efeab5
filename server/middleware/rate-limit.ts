/** Per-address limit on the routes that guess or send things: sign-in, sign-up, reset, invitation accept. */
import { rateLimit } from 'express-rate-limit';
import type { RequestHandler } from 'express';
import { ErrorCode, type ApiErrorBody } from '../../shared/api/errors';

export function authRateLimit(limit: { max: number; windowMs: number }): RequestHandler {
  return rateLimit({
    windowMs: limit.windowMs,
    limit: limit.max,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, res) => {
      const minutes = Math.max(1, Math.ceil(limit.windowMs / 60_000));
      const body: ApiErrorBody = {
        error: {
          code: ErrorCode.RateLimited,
          message: `Too many attempts from your address. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again.`,
        },
      };
      res.status(429).json(body);
    },
  });
}
