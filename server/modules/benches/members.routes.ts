/** /api/benches/:benchId/members: list, change role, remove (or leave). */
import { Router } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import { updateMemberSchema } from '../../../shared/api/schemas';
import type { Role } from '../../../shared/api/types';
import type { AppContext } from '../../app-context';
import { conflict, notFound, roleTooLow } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { parseBody } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { ActivityRepository } from '../activity/activity.repository';
import { MembershipRepository, toMemberDto } from './membership.repository';

const COACH_MANAGED: readonly Role[] = ['member', 'viewer'];

export function memberRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });

  router.get('/', requireRole('viewer'), async (req, res) => {
    const memberships = await new MembershipRepository(ctx.orm.em).list(currentBench(req).bench);
    res.json(memberships.map(toMemberDto));
  });

  router.patch('/:userId', requireRole('coach'), async (req, res) => {
    const body = parseBody(updateMemberSchema, req.body);
    const { bench, role: myRole } = currentBench(req);
    const me = currentUser(req);
    const members = new MembershipRepository(ctx.orm.em);
    const target = await members.find(bench, String(req.params['userId']));
    if (!target) throw notFound('This member');
    if (myRole === 'coach' && !(COACH_MANAGED.includes(target.role) && COACH_MANAGED.includes(body.role))) {
      throw roleTooLow('Coaches can only switch people between member and viewer. Ask an owner for other changes.');
    }
    if (target.role === body.role) {
      res.json(toMemberDto(target));
      return;
    }
    if (target.role === 'owner' && (await members.countOwners(bench)) <= 1) {
      throw conflict(ErrorCode.LastOwner, 'This is the only owner of the bench. Make someone else owner first.');
    }
    const before = target.role;
    target.role = body.role;
    new ActivityRepository(ctx.orm.em).record(
      bench,
      me,
      'member.role_changed',
      `${me.displayName} changed the role of ${target.user.displayName} from ${before} to ${body.role}.`,
      ctx.clock.now(),
    );
    await ctx.orm.em.flush();
    res.json(toMemberDto(target));
  });

  router.delete('/:userId', requireRole('viewer'), async (req, res) => {
    const { bench, role: myRole } = currentBench(req);
    const me = currentUser(req);
    const members = new MembershipRepository(ctx.orm.em);
    const target = await members.find(bench, String(req.params['userId']));
    if (!target) throw notFound('This member');
    const self = target.user.id === me.id;
    const allowed = self || myRole === 'owner' || (myRole === 'coach' && COACH_MANAGED.includes(target.role));
    if (!allowed) {
      throw roleTooLow(
        myRole === 'coach'
          ? 'Coaches can remove members and viewers only. Ask an owner to remove an owner or coach.'
          : `Your role on this bench is ${myRole}; removing others needs coach or higher.`,
      );
    }
    if (target.role === 'owner' && (await members.countOwners(bench)) <= 1) {
      throw conflict(
        ErrorCode.LastOwner,
        self
          ? 'You are the only owner of this bench. Make someone else owner before leaving, or delete the bench.'
          : 'This is the only owner of the bench. Make someone else owner first.',
      );
    }
    members.remove(target);
    new ActivityRepository(ctx.orm.em).record(
      bench,
      me,
      self ? 'member.left' : 'member.removed',
      self ? `${me.displayName} left the bench.` : `${me.displayName} removed ${target.user.displayName} (${target.role}).`,
      ctx.clock.now(),
    );
    await ctx.orm.em.flush();
    res.status(204).end();
  });

  return router;
}
