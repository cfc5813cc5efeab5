import { BenchSummary, Member, Role } from '../../core/api-types';
import { canRemove, invitableRoles, roleChoices } from './member-permissions';

// Expected rights are those of the REST table in DEVELOPERS.md (members and invitations rows).
const member = (userId: string, role: Role): Member => ({ userId, email: `${userId}@example.org`, displayName: userId, role, joinedAt: '' });
const benchAs = (role: Role): BenchSummary => ({ id: 'b', name: 'B', description: '', role, memberCount: 1, createdAt: '' });

describe('member permissions', () => {
  it('owners change any role; coaches only move members and viewers between those two; others nothing', () => {
    expect(roleChoices('owner', member('x', 'coach'))).toEqual(['owner', 'coach', 'member', 'viewer']);
    expect(roleChoices('coach', member('x', 'member'))).toEqual(['member', 'viewer']);
    expect(roleChoices('coach', member('x', 'coach'))).toEqual([]);
    expect(roleChoices('coach', member('x', 'owner'))).toEqual([]);
    expect(roleChoices('member', member('x', 'viewer'))).toEqual([]);
  });

  it('owners remove anyone, coaches remove members and viewers, everyone may leave', () => {
    expect(canRemove('owner', 'me', member('x', 'owner'))).toBe(true);
    expect(canRemove('coach', 'me', member('x', 'viewer'))).toBe(true);
    expect(canRemove('coach', 'me', member('x', 'coach'))).toBe(false);
    expect(canRemove('member', 'me', member('x', 'viewer'))).toBe(false);
    expect(canRemove('viewer', 'me', member('me', 'viewer'))).toBe(true);
  });

  it('only owners invite owners; members and viewers invite nobody', () => {
    expect(invitableRoles(benchAs('owner'))).toContain('owner');
    expect(invitableRoles(benchAs('coach'))).toEqual(['coach', 'member', 'viewer']);
    expect(invitableRoles(benchAs('member'))).toEqual([]);
    expect(invitableRoles(benchAs('viewer'))).toEqual([]);
  });
});
