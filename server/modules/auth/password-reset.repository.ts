import type { EntityManager } from '@mikro-orm/core';
import type { User } from '../users/user.entity';
import { PasswordResetToken } from './password-reset-token.entity';

export class PasswordResetRepository {
  constructor(private readonly em: EntityManager) {}

  create(user: User, tokenHash: string, at: Date, expiresAt: Date): PasswordResetToken {
    return this.em.create(PasswordResetToken, { user, tokenHash, createdAt: at, expiresAt });
  }

  findByHash(tokenHash: string): Promise<PasswordResetToken | null> {
    return this.em.findOne(PasswordResetToken, { tokenHash }, { populate: ['user'] });
  }

  /** Marks every unused link of the user as used (a new link or a successful reset replaces the old ones). */
  async retireAllFor(user: User, at: Date): Promise<void> {
    await this.em.nativeUpdate(PasswordResetToken, { user, usedAt: null }, { usedAt: at });
  }
}
