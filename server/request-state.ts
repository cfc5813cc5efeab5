/** Per-request state set by middleware, with typed accessors for handlers. */
import type { Role } from '../shared/api/types';
import { notSignedIn } from './http-error';
import type { Bench } from './modules/benches/bench.entity';
import type { Membership } from './modules/benches/membership.entity';
import type { User } from './modules/users/user.entity';

export interface BenchAccess {
  bench: Bench;
  /** Effective role: the membership's, or `owner` for an instance admin. */
  role: Role;
  /** Null when an admin who is not a member acts on the bench. */
  membership: Membership | null;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      /** Set by `requireAuth`. */
      authUser?: User;
      /** Set by `loadBench`. */
      benchAccess?: BenchAccess;
    }
  }
}

/** The signed-in user; only call behind `requireAuth`. */
export function currentUser(req: Express.Request): User {
  if (!req.authUser) throw notSignedIn();
  return req.authUser;
}

/** The bench of a bench-scoped route; only call behind `loadBench`. */
export function currentBench(req: Express.Request): BenchAccess {
  if (!req.benchAccess) throw new Error('currentBench() used on a route without the bench loader');
  return req.benchAccess;
}
