import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';

export class User {
  [OptionalProps]?: 'id' | 'isAdmin' | 'tokenVersion' | 'createdAt' | 'updatedAt';
  id: string = randomUUID();
  /** Stored lower-case and trimmed. */
  email!: string;
  displayName!: string;
  passwordHash!: string;
  isAdmin = false;
  /** Part of every sign-in token; bumped by sign-out, password change and password reset. */
  tokenVersion = 0;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const UserSchema = new EntitySchema<User>({
  class: User,
  tableName: 'users',
  properties: {
    id: { type: 'uuid', primary: true },
    email: { type: 'string', length: 254, unique: true },
    displayName: { type: 'string', length: 80 },
    passwordHash: { type: 'string', length: 100, lazy: true },
    isAdmin: { type: 'boolean', default: false },
    tokenVersion: { type: 'integer', default: 0 },
    createdAt: { type: 'datetime' },
    updatedAt: { type: 'datetime', onUpdate: () => new Date() },
  },
});
