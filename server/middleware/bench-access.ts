/**
 * The bench-scoped routing pattern. Mount a module's bench router under `/api/benches/:benchId` (see
 * app.ts); `loadBench` finds the bench and the caller's membership before any module route runs, and
 * `requireRole(min)` guards each route. Non-members get 404 (existence is not revealed); a role too low
 * gets 403. Instance admins act as owners everywhere.
 */
import type { RequestHandler } from 'express';
import { ROLE_RANK, roleAtLeast, type Role } from '../../shared/api/types';
import type { AppContext } from '../app-context';
import { notFound, roleTooLow } from '../http-error';
import { BenchRepository } from '../modules/benches/bench.repository';
import { MembershipRepository } from '../modules/benches/membership.repository';
import { currentBench, currentUser } from '../request-state';
import { UUID } from '../ids';

export function loadBench(ctx: AppContext): RequestHandler {
  return async (req, _res, next) => {
    const user = currentUser(req);
    const benchId = String(req.params['benchId'] ?? '');
    if (!UUID.test(benchId)) throw notFound('This bench');
    const em = ctx.orm.em;
    const bench = await new BenchRepository(em).findById(benchId);
    if (!bench) throw notFound('This bench');
    const membership = await new MembershipRepository(em).find(bench, user.id);
    if (!membership && !user.isAdmin) throw notFound('This bench');
    const role: Role = user.isAdmin ? 'owner' : membership!.role;
    req.benchAccess = { bench, role, membership };
    next();
  };
}

/** 403 unless the caller's role on the bench is at least `minimum`. Use after `loadBench`. */
export function requireRole(minimum: Role): RequestHandler {
  return (req, _res, next) => {
    const { role } = currentBench(req);
    if (!roleAtLeast(role, minimum)) {
      const higher = ROLE_RANK[minimum] < ROLE_RANK.owner ? `${minimum} or higher` : minimum;
      throw roleTooLow(`Your role on this bench is ${role}; this needs ${higher}. Ask an owner to change your role.`);
    }
    next();
  };
}
