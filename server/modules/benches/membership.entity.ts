import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import type { Role } from '../../../shared/api/types';
import { User } from '../users/user.entity';
import { Bench } from './bench.entity';

export class Membership {
  [OptionalProps]?: 'id' | 'createdAt';
  id: string = randomUUID();
  bench!: Bench;
  user!: User;
  role!: Role;
  createdAt: Date = new Date();
}

export const MembershipSchema = new EntitySchema<Membership>({
  class: Membership,
  tableName: 'memberships',
  uniques: [{ properties: ['bench', 'user'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    bench: { kind: 'm:1', entity: () => Bench, deleteRule: 'cascade' },
    user: { kind: 'm:1', entity: () => User, deleteRule: 'cascade', index: true },
    role: { type: 'string', length: 16 },
    createdAt: { type: 'datetime' },
  },
});
