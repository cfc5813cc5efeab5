import type { EntityManager } from '@mikro-orm/core';
import type { BenchSummary, Role } from '../../../shared/api/types';
import type { User } from '../users/user.entity';
import { Bench } from './bench.entity';
import { Membership } from './membership.entity';

export class BenchRepository {
  constructor(private readonly em: EntityManager) {}

  findById(id: string): Promise<Bench | null> {
    return this.em.findOne(Bench, { id });
  }

  /** Creates the bench with `owner` as its first owner (written by the caller's flush). */
  create(data: { name: string; description: string; owner: User; at: Date }): { bench: Bench; membership: Membership } {
    const bench = this.em.create(Bench, {
      name: data.name,
      description: data.description,
      createdAt: data.at,
      updatedAt: data.at,
    });
    const membership = this.em.create(Membership, { bench, user: data.owner, role: 'owner', createdAt: data.at });
    return { bench, membership };
  }

  /** Deletes the bench; the database cascades to memberships, invitations, activity and module rows. */
  async delete(bench: Bench): Promise<void> {
    await this.em.nativeDelete(Bench, { id: bench.id });
    this.em.getUnitOfWork().unsetIdentity(bench);
  }

  async memberCounts(benchIds: string[]): Promise<Map<string, number>> {
    const counts = new Map<string, number>();
    if (benchIds.length === 0) return counts;
    const rows: { bench_id: string; n: number }[] = await this.em
      .getConnection()
      .execute(
        `select bench_id, count(*) as n from memberships where bench_id in (${benchIds.map(() => '?').join(',')}) group by bench_id`,
        benchIds,
      );
    for (const row of rows) counts.set(row.bench_id, Number(row.n));
    return counts;
  }

  async summary(bench: Bench, role: Role): Promise<BenchSummary> {
    const counts = await this.memberCounts([bench.id]);
    return toBenchSummary(bench, role, counts.get(bench.id) ?? 0);
  }

  /** The benches the user belongs to with the user's role; an admin sees every bench (as owner where not a member). */
  async listFor(user: User): Promise<BenchSummary[]> {
    const memberships = await this.em.find(Membership, { user }, { populate: ['bench'] });
    const roles = new Map<string, Role>(memberships.map((m) => [m.bench.id, m.role]));
    const benches = user.isAdmin
      ? await this.em.find(Bench, {}, { orderBy: { name: 'asc', id: 'asc' } })
      : memberships.map((m) => m.bench).sort((a, b) => a.name.localeCompare(b.name) || a.id.localeCompare(b.id));
    const counts = await this.memberCounts(benches.map((b) => b.id));
    return benches.map((b) => toBenchSummary(b, user.isAdmin ? 'owner' : roles.get(b.id)!, counts.get(b.id) ?? 0));
  }
}

export function toBenchSummary(bench: Bench, role: Role, memberCount: number): BenchSummary {
  return {
    id: bench.id,
    name: bench.name,
    description: bench.description,
    role,
    memberCount,
    createdAt: bench.createdAt.toISOString(),
  };
}
