/** /api/admin: instance-admin pages (all users; captured mail in development). */
import { Router, type RequestHandler } from 'express';
import type { AppContext } from '../../app-context';
import { HttpError, notFound } from '../../http-error';
import { ErrorCode } from '../../../shared/api/errors';
import { currentUser } from '../../request-state';
import { toUserDto, UserRepository } from '../users/user.repository';

const requireAdmin: RequestHandler = (req, _res, next) => {
  if (!currentUser(req).isAdmin) {
    throw new HttpError(403, ErrorCode.RoleTooLow, 'Only the instance admin can open this page.');
  }
  next();
};

/** Mounted at /api/admin behind requireAuth. */
export function adminRoutes(ctx: AppContext): Router {
  const router = Router();
  router.use(requireAdmin);

  router.get('/users', async (_req, res) => {
    const users = await new UserRepository(ctx.orm.em).listAll();
    res.json(users.map(toUserDto));
  });

  router.get('/mail', (_req, res) => {
    if (!ctx.config.devMode || !ctx.mailbox) throw notFound('The captured-mail page');
    res.json(ctx.mailbox.list());
  });

  return router;
}
