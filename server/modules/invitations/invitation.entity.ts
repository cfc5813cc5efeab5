import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import type { Role } from '../../../shared/api/types';
import { Bench } from '../benches/bench.entity';
import { User } from '../users/user.entity';

/** An invitation by e-mail. Only the SHA-256 of the link token is stored. */
export class Invitation {
  [OptionalProps]?: 'id' | 'createdAt' | 'acceptedAt' | 'acceptedBy' | 'revokedAt';
  id: string = randomUUID();
  bench!: Bench;
  email!: string;
  role!: Role;
  tokenHash!: string;
  invitedBy!: User | null;
  createdAt: Date = new Date();
  expiresAt!: Date;
  acceptedAt: Date | null = null;
  acceptedBy: User | null = null;
  revokedAt: Date | null = null;
}

export const InvitationSchema = new EntitySchema<Invitation>({
  class: Invitation,
  tableName: 'invitations',
  indexes: [{ properties: ['bench', 'email'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    bench: { kind: 'm:1', entity: () => Bench, deleteRule: 'cascade' },
    email: { type: 'string', length: 254 },
    role: { type: 'string', length: 16 },
    tokenHash: { type: 'string', length: 64, unique: true },
    invitedBy: { kind: 'm:1', entity: () => User, nullable: true, deleteRule: 'set null' },
    createdAt: { type: 'datetime' },
    expiresAt: { type: 'datetime' },
    acceptedAt: { type: 'datetime', nullable: true },
    acceptedBy: { kind: 'm:1', entity: () => User, nullable: true, deleteRule: 'set null' },
    revokedAt: { type: 'datetime', nullable: true },
  },
});
