import type { EntityManager } from '@mikro-orm/core';
import type { Member } from '../../../shared/api/types';
import type { User } from '../users/user.entity';
import type { Bench } from './bench.entity';
import { Membership } from './membership.entity';

export function toMemberDto(membership: Membership): Member {
  return {
    userId: membership.user.id,
    email: membership.user.email,
    displayName: membership.user.displayName,
    role: membership.role,
    joinedAt: membership.createdAt.toISOString(),
  };
}

export class MembershipRepository {
  constructor(private readonly em: EntityManager) {}

  find(bench: Bench, userId: string): Promise<Membership | null> {
    return this.em.findOne(Membership, { bench, user: userId }, { populate: ['user'] });
  }

  list(bench: Bench): Promise<Membership[]> {
    return this.em.find(Membership, { bench }, { populate: ['user'], orderBy: { createdAt: 'asc', id: 'asc' } });
  }

  async hasMember(bench: Bench, userId: string): Promise<boolean> {
    return (await this.em.count(Membership, { bench, user: userId })) > 0;
  }

  async hasMemberWithEmail(bench: Bench, email: string): Promise<boolean> {
    return (await this.em.count(Membership, { bench, user: { email } })) > 0;
  }

  countOwners(bench: Bench): Promise<number> {
    return this.em.count(Membership, { bench, role: 'owner' });
  }

  add(bench: Bench, user: User, role: Membership['role'], at: Date): Membership {
    return this.em.create(Membership, { bench, user, role, createdAt: at });
  }

  remove(membership: Membership): void {
    this.em.remove(membership);
  }
}
