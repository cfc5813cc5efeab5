/**
 * The demo seed: runs on first start (empty users table) when SEED_DEMO is on. It is a list of steps so
 * other modules can append theirs (e.g. "load demo corpora" into the demo bench). All names are invented;
 * they may still match real people by chance.
 */
import type { EntityManager } from '@mikro-orm/core';
import type { Role } from '../../shared/api/types';
import type { Clock } from '../clock';
import type { Config } from '../config';
import type { Orm } from '../db/orm';
import { ActivityRepository } from '../modules/activity/activity.repository';
import { hashPassword } from '../modules/auth/passwords';
import type { Bench } from '../modules/benches/bench.entity';
import { BenchRepository } from '../modules/benches/bench.repository';
import { MembershipRepository } from '../modules/benches/membership.repository';
import type { User } from '../modules/users/user.entity';
import { UserRepository } from '../modules/users/user.repository';
import { loadDemoCorpora } from './demo-corpora';
import { createDemoRuns } from './demo-runs';

export interface SeedContext {
  em: EntityManager;
  config: Config;
  clock: Clock;
  /** Filled by earlier steps for later ones. */
  demo: { admin?: User; bench?: Bench; people: User[] };
}

export interface SeedStep {
  name: string;
  run(ctx: SeedContext): Promise<void>;
}

export const DEMO_BENCH_NAME = 'Harbour lab';

/** Invented people, one or more per role (the demo admin is the owner). */
export const DEMO_PEOPLE: readonly { email: string; displayName: string; role: Role }[] = [
  { email: 'tamsin.ferro@noisewright.local', displayName: 'Tamsin Ferro', role: 'owner' },
  { email: 'oskar.velde@noisewright.local', displayName: 'Oskar Velde', role: 'coach' },
  { email: 'priya.lunn@noisewright.local', displayName: 'Priya Lunn', role: 'member' },
  { email: 'maro.quist@noisewright.local', displayName: 'Maro Quist', role: 'member' },
  { email: 'ines.harrow@noisewright.local', displayName: 'Ines Harrow', role: 'viewer' },
];

const createPeople: SeedStep = {
  name: 'demo admin and people',
  async run(ctx) {
    const users = new UserRepository(ctx.em);
    const at = ctx.clock.now();
    const hash = await hashPassword(ctx.config.demoPassword, ctx.config.bcryptCost);
    ctx.demo.admin = users.create({ email: ctx.config.demoEmail, displayName: 'Demo Admin', passwordHash: hash, isAdmin: true, at });
    for (const person of DEMO_PEOPLE) {
      ctx.demo.people.push(users.create({ email: person.email, displayName: person.displayName, passwordHash: hash, at }));
    }
    await ctx.em.flush();
  },
};

const createBench: SeedStep = {
  name: 'demo bench',
  async run(ctx) {
    const admin = ctx.demo.admin;
    if (!admin) throw new Error('The demo bench step needs the demo admin step before it.');
    const at = ctx.clock.now();
    const { bench } = new BenchRepository(ctx.em).create({
      name: DEMO_BENCH_NAME,
      description: 'A sandbox bench with invented people in every role. Try a corpus and a first run here.',
      owner: admin,
      at,
    });
    const members = new MembershipRepository(ctx.em);
    const activity = new ActivityRepository(ctx.em);
    activity.record(bench, admin, 'bench.created', `${admin.displayName} created the bench "${bench.name}".`, at);
    DEMO_PEOPLE.forEach((person, i) => {
      const user = ctx.demo.people[i]!;
      members.add(bench, user, person.role, at);
      activity.record(bench, user, 'invitation.accepted', `${user.displayName} joined as ${person.role}.`, at);
    });
    ctx.demo.bench = bench;
    await ctx.em.flush();
  },
};

/** Append steps here (or push from a module) to extend the demo. */
export const demoSeedSteps: SeedStep[] = [createPeople, createBench, loadDemoCorpora, createDemoRuns];

/** Runs every step if the database has no users yet. Returns whether it seeded. */
export async function seedDemoIfEmpty(orm: Orm, config: Config, clock: Clock, steps = demoSeedSteps): Promise<boolean> {
  // One transaction: a failing step leaves the database empty, so the next start tries again.
  return orm.em.fork().transactional(async (em) => {
    if ((await new UserRepository(em).count()) > 0) return false;
    const ctx: SeedContext = { em, config, clock, demo: { people: [] } };
    for (const step of steps) {
      try {
        await step.run(ctx);
      } catch (error) {
        throw new Error(`Demo seed step "${step.name}" failed: ${error instanceof Error ? error.message : String(error)}`);
      }
    }
    return true;
  });
}
