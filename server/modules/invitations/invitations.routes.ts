/** /api/benches/:benchId/invitations: list pending, invite by e-mail, revoke. */
import { Router } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import { createInvitationSchema } from '../../../shared/api/schemas';
import type { AppContext } from '../../app-context';
import { conflict, gone, notFound, roleTooLow } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { perKeyRateLimit } from '../../middleware/rate-limit';
import { parseBody } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { ActivityRepository } from '../activity/activity.repository';
import { newLinkToken } from '../auth/tokens';
import { MembershipRepository } from '../benches/membership.repository';
import { invitationMail } from '../mail/mail-templates';
import { InvitationRepository, toInvitationDto } from './invitation.repository';

export function invitationRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });

  router.get('/', requireRole('coach'), async (req, res) => {
    const pending = await new InvitationRepository(ctx.orm.em).listPending(currentBench(req).bench, ctx.clock.now());
    res.json(pending.map(toInvitationDto));
  });

  // Invitations send mail with a bench name of the sender's choosing: limited per sender, per bench and per address.
  const limits = ctx.config.inviteRateLimit;
  const window = (max: number) => ({ max, windowMs: limits.windowMs });
  const perSender = perKeyRateLimit(window(limits.perSender), (req) => req.authUser?.id ?? null, 'invitations sent by you');
  const perBench = perKeyRateLimit(window(limits.perBench), (req) => req.benchAccess?.bench.id ?? null, 'invitations from this bench');
  const perAddress = perKeyRateLimit(
    window(limits.perAddress),
    (req) => {
      const email = (req.body as { email?: unknown } | undefined)?.email;
      return typeof email === 'string' && req.benchAccess ? `${req.benchAccess.bench.id} ${email.trim().toLowerCase()}` : null;
    },
    'invitations to this address',
  );
  router.post('/', requireRole('coach'), perSender, perBench, perAddress, async (req, res) => {
    const body = parseBody(createInvitationSchema, req.body);
    const { bench, role: myRole } = currentBench(req);
    const me = currentUser(req);
    if (body.role === 'owner' && myRole !== 'owner') {
      throw roleTooLow('Only owners can invite new owners. Invite as coach, member or viewer instead.');
    }
    const em = ctx.orm.em;
    if (await new MembershipRepository(em).hasMemberWithEmail(bench, body.email)) throw conflict(ErrorCode.AlreadyMember, `${body.email} is already a member of this bench.`);
    const invitations = new InvitationRepository(em);
    const now = ctx.clock.now();
    // A new invitation to the same address replaces the pending ones (their links stop working).
    for (const old of await invitations.listPendingFor(bench, body.email, now)) old.revokedAt = now;
    const { token, hash } = newLinkToken();
    const invitation = invitations.create({ bench, email: body.email, role: body.role, tokenHash: hash, invitedBy: me, at: now });
    new ActivityRepository(em).record(bench, me, 'invitation.sent', `${me.displayName} invited ${body.email} as ${body.role}.`, now);
    await em.flush();
    const mail = invitationMail({
      to: body.email,
      publicUrl: ctx.config.publicUrl,
      token,
      benchName: bench.name,
      inviterName: me.displayName,
      role: body.role,
      expiresAt: invitation.expiresAt,
    });
    ctx.mailer.send(mail).catch(ctx.logError);
    res.status(201).json(toInvitationDto(invitation));
  });

  router.delete('/:invitationId', requireRole('coach'), async (req, res) => {
    const { bench } = currentBench(req);
    const me = currentUser(req);
    const invitation = await new InvitationRepository(ctx.orm.em).findInBench(bench, String(req.params['invitationId']));
    if (!invitation) throw notFound('This invitation');
    if (invitation.acceptedAt) throw gone(ErrorCode.InvitationUnusable, 'This invitation was already accepted; remove the member instead.');
    if (!invitation.revokedAt) {
      invitation.revokedAt = ctx.clock.now();
      new ActivityRepository(ctx.orm.em).record(
        bench,
        me,
        'invitation.revoked',
        `${me.displayName} withdrew the invitation of ${invitation.email}.`,
        ctx.clock.now(),
      );
      await ctx.orm.em.flush();
    }
    res.status(204).end();
  });

  return router;
}
