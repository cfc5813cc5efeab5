/** `requireAuth`: checks the bearer token and its token version, and puts the user on the request. */
import type { RequestHandler } from 'express';
import type { AppContext } from '../app-context';
import { notSignedIn } from '../http-error';
import { verifySessionToken } from '../modules/auth/tokens';
import { UserRepository } from '../modules/users/user.repository';

export function requireAuth(ctx: AppContext): RequestHandler {
  return async (req, _res, next) => {
    const header = req.get('authorization') ?? '';
    const match = /^Bearer\s+(\S+)$/i.exec(header);
    if (!match) throw notSignedIn();
    const claims = verifySessionToken(ctx.config, ctx.clock, match[1]!);
    if (!claims) throw notSignedIn('Your session has ended. Sign in again.');
    const user = await new UserRepository(ctx.orm.em).findById(claims.sub);
    if (!user || user.tokenVersion !== claims.tv) throw notSignedIn('Your session has ended. Sign in again.');
    req.authUser = user;
    next();
  };
}
