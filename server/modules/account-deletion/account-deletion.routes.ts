/** DELETE /api/auth/account: a signed-in person deletes their own account (rules in account-deletion.ts). */
import { Router } from 'express';
import { deleteAccountSchema } from '../../../shared/api/schemas';
import type { AppContext } from '../../app-context';
import { validationFailed } from '../../http-error';
import { authRateLimit, perKeyRateLimit } from '../../middleware/rate-limit';
import { parseBody } from '../../middleware/validate';
import { currentUser } from '../../request-state';
import { verifyPassword } from '../auth/passwords';
import { UserRepository } from '../users/user.repository';
import { AccountDeletion } from './account-deletion';

/** Mounted at /api/auth/account behind requireAuth. */
export function accountDeletionRoutes(ctx: AppContext): Router {
  const router = Router();

  // Rate limited like the other routes that check a password: a stolen token must not turn into password guessing.
  const perPerson = perKeyRateLimit(ctx.config.authRateLimit, (req) => req.authUser?.id ?? null, 'attempts to delete your account');
  router.delete('/', perPerson, authRateLimit(ctx.config.authRateLimit), async (req, res) => {
    const body = parseBody(deleteAccountSchema, req.body);
    const me = currentUser(req);
    // A wrong password is a 422 on the field (never 401, so the client does not sign the person out).
    const withHash = await new UserRepository(ctx.orm.em).findByIdWithPassword(me.id);
    if (!withHash || !(await verifyPassword(body.password, withHash.passwordHash))) {
      throw validationFailed(
        { password: 'The password is wrong: type your current password again.' },
        'The password is wrong, so nothing was deleted. Type your current password again.',
      );
    }
    if (body.confirmEmail !== me.email) {
      throw validationFailed(
        { confirmEmail: `Type your e-mail address, ${me.email}, exactly to confirm.` },
        'The e-mail address you typed is not this account\'s, so nothing was deleted.',
      );
    }
    // bcrypt is done before the transaction starts: nothing slow runs while it is open.
    await ctx.orm.em.transactional((em) => new AccountDeletion(em).run(me.id, ctx.clock.now()));
    res.status(204).end();
  });

  return router;
}
