import { BenchSummary, Member, Role } from '../../core/api-types';

/**
 * What the caller may do to one member, following the REST contract (DEVELOPERS.md):
 * owners change any role and remove anyone; coaches move people between member and viewer and remove
 * members and viewers; everybody may leave. The server has the final word (e.g. the last owner).
 */
export function roleChoices(me: Role, target: Member): Role[] {
  if (me === 'owner') return ['owner', 'coach', 'member', 'viewer'];
  if (me === 'coach' && (target.role === 'member' || target.role === 'viewer')) return ['member', 'viewer'];
  return [];
}

export function canRemove(me: Role, myUserId: string | undefined, target: Member): boolean {
  if (target.userId === myUserId) return true;
  if (me === 'owner') return true;
  return me === 'coach' && (target.role === 'member' || target.role === 'viewer');
}

/** Roles the caller may hand out in an invitation (only owners invite owners). */
export function invitableRoles(bench: BenchSummary): Role[] {
  if (bench.role === 'owner') return ['owner', 'coach', 'member', 'viewer'];
  if (bench.role === 'coach') return ['coach', 'member', 'viewer'];
  return [];
}
