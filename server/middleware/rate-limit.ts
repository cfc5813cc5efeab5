/**
 * Limits on the routes that guess or send things (express-rate-limit). `authRateLimit` counts per client
 * address: sign-in, sign-up, reset, invitation accept. `perKeyRateLimit` counts per any key (the signed-in
 * person, the bench, the invited address): password change, account deletion, invitations.
 */
import { rateLimit } from 'express-rate-limit';
import type { Request, RequestHandler } from 'express';
import { ErrorCode, type ApiErrorBody } from '../../shared/api/errors';

function waitText(windowMs: number): string {
  const minutes = Math.max(1, Math.ceil(windowMs / 60_000));
  return `${minutes} minute${minutes === 1 ? '' : 's'}`;
}

export function authRateLimit(limit: { max: number; windowMs: number }): RequestHandler {
  return rateLimit({
    windowMs: limit.windowMs,
    limit: limit.max,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, res) => {
      const body: ApiErrorBody = {
        error: {
          code: ErrorCode.RateLimited,
          message: `Too many attempts from your address. Wait ${waitText(limit.windowMs)} and try again.`,
        },
      };
      res.status(429).json(body);
    },
  });
}

/**
 * A limit counted per key (null = not counted). `what` finishes the sentence "Too many ...", e.g.
 * "password changes for your account".
 */
export function perKeyRateLimit(
  limit: { max: number; windowMs: number },
  key: (req: Request) => string | null,
  what: string,
): RequestHandler {
  return rateLimit({
    windowMs: limit.windowMs,
    limit: limit.max,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skip: (req) => key(req) === null,
    keyGenerator: (req) => key(req) ?? '',
    handler: (_req, res) => {
      const body: ApiErrorBody = {
        error: { code: ErrorCode.RateLimited, message: `Too many ${what}. Wait ${waitText(limit.windowMs)} and try again.` },
      };
      res.status(429).json(body);
    },
  });
}
