import type { EntityManager } from '@mikro-orm/core';
import type { User as UserDto } from '../../../shared/api/types';
import { User } from './user.entity';

export function toUserDto(user: User): UserDto {
  return {
    id: user.id,
    email: user.email,
    displayName: user.displayName,
    isAdmin: user.isAdmin,
    createdAt: user.createdAt.toISOString(),
  };
}

export class UserRepository {
  constructor(private readonly em: EntityManager) {}

  findById(id: string): Promise<User | null> {
    return this.em.findOne(User, { id });
  }

  /** `email` must already be normalised (trimmed, lower-case), as the shared schemas do. */
  findByEmail(email: string): Promise<User | null> {
    return this.em.findOne(User, { email });
  }

  /** With the (lazy) password hash loaded. */
  findByEmailWithPassword(email: string): Promise<User | null> {
    return this.em.findOne(User, { email }, { populate: ['passwordHash'] });
  }

  findByIdWithPassword(id: string): Promise<User | null> {
    return this.em.findOne(User, { id }, { populate: ['passwordHash'] });
  }

  async exists(email: string): Promise<boolean> {
    return (await this.em.count(User, { email })) > 0;
  }

  countAdmins(): Promise<number> {
    return this.em.count(User, { isAdmin: true });
  }

  count(): Promise<number> {
    return this.em.count(User, {});
  }

  listAll(): Promise<User[]> {
    return this.em.find(User, {}, { orderBy: { createdAt: 'asc', email: 'asc' } });
  }

  create(data: { email: string; displayName: string; passwordHash: string; isAdmin?: boolean; at: Date }): User {
    return this.em.create(User, {
      email: data.email,
      displayName: data.displayName,
      passwordHash: data.passwordHash,
      isAdmin: data.isAdmin ?? false,
      createdAt: data.at,
      updatedAt: data.at,
    });
  }
}
