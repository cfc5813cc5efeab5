import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import { User } from '../users/user.entity';

/** A password-reset link. Only the SHA-256 of the token is stored; the token itself travels in the e-mail. */
export class PasswordResetToken {
  [OptionalProps]?: 'id' | 'createdAt' | 'usedAt';
  id: string = randomUUID();
  user!: User;
  tokenHash!: string;
  createdAt: Date = new Date();
  expiresAt!: Date;
  usedAt: Date | null = null;
}

export const PasswordResetTokenSchema = new EntitySchema<PasswordResetToken>({
  class: PasswordResetToken,
  tableName: 'password_reset_tokens',
  properties: {
    id: { type: 'uuid', primary: true },
    user: { kind: 'm:1', entity: () => User, deleteRule: 'cascade', index: true },
    tokenHash: { type: 'string', length: 64, unique: true },
    createdAt: { type: 'datetime' },
    expiresAt: { type: 'datetime' },
    usedAt: { type: 'datetime', nullable: true },
  },
});
