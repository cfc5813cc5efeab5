/** /api/auth: sign-up, sign-in, sign-out, current user, password change (reset: password-reset.routes.ts). */
import { UniqueConstraintViolationException } from '@mikro-orm/core';
import { Router } from 'express';
import { ErrorCode, SIGN_IN_FAILED_MESSAGE } from '../../../shared/api/errors';
import type { AuthResponse } from '../../../shared/api/types';
import { changePasswordSchema, signInSchema, signUpSchema } from '../../../shared/api/schemas';
import type { AppContext } from '../../app-context';
import { conflict, HttpError, validationFailed } from '../../http-error';
import { requireAuth } from '../../middleware/auth';
import { authRateLimit, perKeyRateLimit } from '../../middleware/rate-limit';
import { parseBody } from '../../middleware/validate';
import { currentUser } from '../../request-state';
import { toUserDto, UserRepository } from '../users/user.repository';
import { hashPassword, verifyAgainstDummy, verifyPassword } from './passwords';
import { passwordResetRoutes } from './password-reset.routes';
import { checkNewPassword } from './password-policy';
import { signSessionToken } from './tokens';

const emailTaken = () =>
  conflict(ErrorCode.EmailTaken, 'An account with this e-mail address exists already. Sign in, or reset the password.');

export function authRoutes(ctx: AppContext): Router {
  const router = Router();
  const em = () => ctx.orm.em;
  const signedIn = requireAuth(ctx);

  router.post('/signup', authRateLimit(ctx.config.authRateLimit), async (req, res) => {
    const body = parseBody(signUpSchema, req.body);
    const users = new UserRepository(em());
    if (await users.exists(body.email)) throw emailTaken();
    await checkNewPassword(body.password, body, 'password');
    // In development the first account becomes the admin; in production only with ADMIN_EMAIL or the
    // one-time setup code printed in the server log (admin-setup.ts).
    const isFirst = await ctx.adminSetup.grantsAdmin(users, body.email, body.setupCode);
    const user = users.create({
      email: body.email,
      displayName: body.displayName,
      passwordHash: await hashPassword(body.password, ctx.config.bcryptCost),
      isAdmin: isFirst,
      at: ctx.clock.now(),
    });
    try {
      await em().flush();
    } catch (error) {
      // Two sign-ups with one address at the same moment: the unique index decides.
      if (error instanceof UniqueConstraintViolationException) throw emailTaken();
      throw error;
    }
    const answer: AuthResponse = { token: signSessionToken(ctx.config, ctx.clock, user), user: toUserDto(user) };
    res.status(201).json(answer);
  });

  router.post('/signin', authRateLimit(ctx.config.authRateLimit), async (req, res) => {
    const body = parseBody(signInSchema, req.body);
    const user = await new UserRepository(em()).findByEmailWithPassword(body.email);
    const ok = user
      ? await verifyPassword(body.password, user.passwordHash)
      : await verifyAgainstDummy(body.password, ctx.config.bcryptCost);
    if (!user || !ok) throw new HttpError(401, ErrorCode.BadCredentials, SIGN_IN_FAILED_MESSAGE);
    const answer: AuthResponse = { token: signSessionToken(ctx.config, ctx.clock, user), user: toUserDto(user) };
    res.json(answer);
  });

  router.post('/signout', signedIn, async (req, res) => {
    const user = currentUser(req);
    user.tokenVersion += 1;
    await em().flush();
    res.status(204).end();
  });

  router.get('/me', signedIn, (req, res) => {
    res.json({ user: toUserDto(currentUser(req)) });
  });

  // Limited per person (a stolen token must not turn into password guessing) and per address.
  const passwordChangeLimit = perKeyRateLimit(ctx.config.authRateLimit, (req) => req.authUser?.id ?? null, 'password changes for your account');
  router.post('/password', signedIn, passwordChangeLimit, authRateLimit(ctx.config.authRateLimit), async (req, res) => {
    const body = parseBody(changePasswordSchema, req.body);
    const user = await new UserRepository(em()).findByIdWithPassword(currentUser(req).id);
    if (!user || !(await verifyPassword(body.currentPassword, user.passwordHash))) {
      throw validationFailed({ currentPassword: 'The current password is wrong: type it again.' });
    }
    await checkNewPassword(body.newPassword, user, 'newPassword');
    user.passwordHash = await hashPassword(body.newPassword, ctx.config.bcryptCost);
    user.tokenVersion += 1;
    await em().flush();
    res.json({ token: signSessionToken(ctx.config, ctx.clock, user) });
  });

  router.use('/reset', passwordResetRoutes(ctx));
  return router;
}
