/**
 * `requireRunner`: the guard of /api/runner/*. Only runner tokens (`Bearer nwr_...`) pass; a session token of
 * a person gets 401 (and the person routes refuse runner tokens, which are no session tokens). A revoked token
 * gets 401 RUNNER_REVOKED.
 */
import type { Request, RequestHandler } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import type { AppContext } from '../../app-context';
import { HttpError, notSignedIn } from '../../http-error';
import type { Runner } from './runner.entity';
import { RunnerRepository } from './runner.repository';
import { looksLikeRunnerToken } from './runner-tokens';

const runners = new WeakMap<Request, Runner>();

export function requireRunner(ctx: AppContext): RequestHandler {
  return async (req, _res, next) => {
    const match = /^Bearer\s+(\S+)$/i.exec(req.get('authorization') ?? '');
    if (!match || !looksLikeRunnerToken(match[1]!)) {
      throw notSignedIn('Send a runner token (Authorization: Bearer nwr_...); an admin creates one on the Runners page.');
    }
    const runner = await new RunnerRepository(ctx.orm.em).findByToken(match[1]!);
    if (!runner) throw notSignedIn('This runner token is not known here; ask an admin for a token of this server.');
    if (runner.revokedAt) {
      throw new HttpError(401, ErrorCode.RunnerRevoked, `The token of the runner "${runner.name}" was revoked; ask an admin for a new one.`);
    }
    runners.set(req, runner);
    next();
  };
}

/** The runner of the request; only behind `requireRunner`. */
export function currentRunner(req: Request): Runner {
  const runner = runners.get(req);
  if (!runner) throw notSignedIn();
  return runner;
}
