/** /api/invitations/:token: what an invitation link shows, and accepting it. */
import { Router } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import type { AcceptInvitationResponse, InvitationPreview } from '../../../shared/api/types';
import type { AppContext } from '../../app-context';
import { conflict, gone, HttpError, notFound } from '../../http-error';
import { requireAuth } from '../../middleware/auth';
import { authRateLimit } from '../../middleware/rate-limit';
import { currentUser } from '../../request-state';
import { ActivityRepository } from '../activity/activity.repository';
import { hashLinkToken } from '../auth/tokens';
import { MembershipRepository } from '../benches/membership.repository';
import { UserRepository } from '../users/user.repository';
import type { Invitation } from './invitation.entity';
import { invitationProblem, InvitationRepository } from './invitation.repository';

export function invitationLinkRoutes(ctx: AppContext): Router {
  const router = Router();

  async function findUsable(token: string): Promise<Invitation> {
    const invitation = await new InvitationRepository(ctx.orm.em).findByHash(hashLinkToken(token));
    if (!invitation) throw notFound('This invitation');
    const problem = invitationProblem(invitation, ctx.clock.now());
    if (problem) throw gone(ErrorCode.InvitationUnusable, problem);
    return invitation;
  }

  router.get('/:token', authRateLimit(ctx.config.authRateLimit), async (req, res) => {
    const invitation = await findUsable(String(req.params['token']));
    const answer: InvitationPreview = {
      benchName: invitation.bench.name,
      role: invitation.role,
      email: invitation.email,
      invitedBy: invitation.invitedBy?.displayName ?? null,
      expiresAt: invitation.expiresAt.toISOString(),
      accountExists: await new UserRepository(ctx.orm.em).exists(invitation.email),
    };
    res.json(answer);
  });

  router.post('/:token/accept', authRateLimit(ctx.config.authRateLimit), requireAuth(ctx), async (req, res) => {
    const me = currentUser(req);
    const em = ctx.orm.em;
    const invitation = await findUsable(String(req.params['token']));
    if (invitation.email !== me.email) {
      throw new HttpError(
        403,
        ErrorCode.InvitationEmailMismatch,
        `This invitation was sent to ${invitation.email}. Sign in with that address (or sign up with it) to accept.`,
      );
    }
    const bench = invitation.bench;
    const members = new MembershipRepository(em);
    if (await members.hasMember(bench, me.id)) {
      throw conflict(ErrorCode.AlreadyMember, 'You are already a member of this bench.');
    }
    const now = ctx.clock.now();
    // Of two simultaneous accepts, only one can win the claim.
    if (!(await new InvitationRepository(em).claim(invitation, me, now))) {
      throw gone(ErrorCode.InvitationUnusable, 'This invitation has already been used.');
    }
    members.add(bench, me, invitation.role, now);
    new ActivityRepository(em).record(bench, me, 'invitation.accepted', `${me.displayName} joined as ${invitation.role}.`, now);
    await em.flush();
    const answer: AcceptInvitationResponse = { benchId: bench.id };
    res.json(answer);
  });

  return router;
}
