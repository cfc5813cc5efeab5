import type { EntityManager } from '@mikro-orm/core';
import type { Invitation as InvitationDto, Role } from '../../../shared/api/types';
import type { Bench } from '../benches/bench.entity';
import type { User } from '../users/user.entity';
import { Invitation } from './invitation.entity';

export const INVITATION_LIFETIME_MS = 7 * 24 * 3600 * 1000;

export function toInvitationDto(invitation: Invitation): InvitationDto {
  return {
    id: invitation.id,
    email: invitation.email,
    role: invitation.role,
    invitedBy: invitation.invitedBy?.displayName ?? null,
    createdAt: invitation.createdAt.toISOString(),
    expiresAt: invitation.expiresAt.toISOString(),
  };
}

/** Why an invitation can no longer be used, or null when it still can. */
export function invitationProblem(invitation: Invitation, now: Date): string | null {
  if (invitation.revokedAt) return 'This invitation was withdrawn. Ask the bench owner or coach for a new one.';
  if (invitation.acceptedAt) return 'This invitation has already been used. Sign in to reach the bench, or ask for a new invitation.';
  if (invitation.expiresAt.getTime() <= now.getTime()) return 'This invitation has expired. Ask the bench owner or coach for a new one.';
  return null;
}

export class InvitationRepository {
  constructor(private readonly em: EntityManager) {}

  create(data: { bench: Bench; email: string; role: Role; tokenHash: string; invitedBy: User; at: Date }): Invitation {
    return this.em.create(Invitation, {
      bench: data.bench,
      email: data.email,
      role: data.role,
      tokenHash: data.tokenHash,
      invitedBy: data.invitedBy,
      createdAt: data.at,
      expiresAt: new Date(data.at.getTime() + INVITATION_LIFETIME_MS),
    });
  }

  /** Marks the invitation accepted unless someone got there first; true when this call won. */
  async claim(invitation: Invitation, user: User, at: Date): Promise<boolean> {
    const changed = await this.em.nativeUpdate(
      Invitation,
      { id: invitation.id, acceptedAt: null, revokedAt: null },
      { acceptedAt: at, acceptedBy: user.id },
    );
    return changed === 1;
  }

  findByHash(tokenHash: string): Promise<Invitation | null> {
    return this.em.findOne(Invitation, { tokenHash }, { populate: ['bench', 'invitedBy'] });
  }

  findInBench(bench: Bench, id: string): Promise<Invitation | null> {
    return this.em.findOne(Invitation, { bench, id }, { populate: ['invitedBy'] });
  }

  /** Invitations that can still be accepted, newest first. */
  listPending(bench: Bench, now: Date): Promise<Invitation[]> {
    return this.em.find(
      Invitation,
      { bench, acceptedAt: null, revokedAt: null, expiresAt: { $gt: now } },
      { populate: ['invitedBy'], orderBy: { createdAt: 'desc', id: 'asc' } },
    );
  }

  /** Pending invitations of one address on one bench (a new invitation replaces them). */
  listPendingFor(bench: Bench, email: string, now: Date): Promise<Invitation[]> {
    return this.em.find(Invitation, { bench, email, acceptedAt: null, revokedAt: null, expiresAt: { $gt: now } });
  }
}
