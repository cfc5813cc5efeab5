/** /api/auth/reset: request a reset link by e-mail (always 202) and confirm it with a new password. */
import { Router } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import { resetConfirmSchema, resetRequestSchema } from '../../../shared/api/schemas';
import type { AppContext } from '../../app-context';
import { gone } from '../../http-error';
import { authRateLimit } from '../../middleware/rate-limit';
import { parseBody } from '../../middleware/validate';
import { passwordResetMail } from '../mail/mail-templates';
import { UserRepository } from '../users/user.repository';
import { hashPassword } from './passwords';
import { checkNewPassword } from './password-policy';
import { PasswordResetRepository } from './password-reset.repository';
import { hashLinkToken, newLinkToken } from './tokens';

export const RESET_LINK_LIFETIME_MS = 3600 * 1000;

export function passwordResetRoutes(ctx: AppContext): Router {
  const router = Router();

  router.post('/request', authRateLimit(ctx.config.authRateLimit), async (req, res) => {
    const body = parseBody(resetRequestSchema, req.body);
    // The answer goes out before anything is looked up, so its timing says nothing about the address;
    // the lookup, the link and the mail follow in the background.
    res.status(202).json({ message: 'If an account with this address exists, a reset link is on its way.' });
    sendResetLink(ctx, body.email).catch(ctx.logError);
  });

  router.post('/confirm', authRateLimit(ctx.config.authRateLimit), async (req, res) => {
    const body = parseBody(resetConfirmSchema, req.body);
    const em = ctx.orm.em;
    const resets = new PasswordResetRepository(em);
    const reset = await resets.findByHash(hashLinkToken(body.token));
    const now = ctx.clock.now();
    if (!reset || reset.usedAt || reset.expiresAt.getTime() <= now.getTime()) {
      throw gone(ErrorCode.ResetLinkUnusable, 'This reset link is no longer valid (links work once, for one hour). Ask for a new one.');
    }
    const user = reset.user;
    await checkNewPassword(body.newPassword, user, 'newPassword');
    user.passwordHash = await hashPassword(body.newPassword, ctx.config.bcryptCost);
    user.tokenVersion += 1;
    reset.usedAt = now;
    await em.flush();
    await resets.retireAllFor(user, now);
    res.status(204).end();
  });

  return router;
}

async function sendResetLink(ctx: AppContext, email: string): Promise<void> {
  const em = ctx.orm.em.fork();
  const user = await new UserRepository(em).findByEmail(email);
  if (!user) return;
  const resets = new PasswordResetRepository(em);
  const now = ctx.clock.now();
  await resets.retireAllFor(user, now);
  const { token, hash } = newLinkToken();
  resets.create(user, hash, now, new Date(now.getTime() + RESET_LINK_LIFETIME_MS));
  await em.flush();
  await ctx.mailer.send(passwordResetMail({ to: user.email, publicUrl: ctx.config.publicUrl, token, displayName: user.displayName }));
}
