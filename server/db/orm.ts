/** Opens the SQLite database through MikroORM and brings its schema up to date with the Migrator. */
import type { BetterSqliteDriver } from '@mikro-orm/better-sqlite';
import { MikroORM, type Options } from '@mikro-orm/core';
import { Migrator } from '@mikro-orm/migrations';
import { mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { entities } from './entities';
import { migrationsList } from './migrations';
import { BoundSqliteDriver } from './sqlite-driver';

export type Orm = MikroORM<BetterSqliteDriver>;

const migrationsDir = resolve(dirname(fileURLToPath(import.meta.url)), '../migrations');

export function ormOptions(databasePath: string, opts: { debugSql?: boolean; logger?: (message: string) => void } = {}): Options<BetterSqliteDriver> {
  return {
    driver: BoundSqliteDriver,
    dbName: databasePath,
    entities,
    extensions: [Migrator],
    discovery: { requireEntitiesArray: true },
    allowGlobalContext: false,
    forceUtcTimezone: true,
    // Query logging only when asked for (DEBUG_SQL); statements are bound, so the text holds `?`, not values.
    debug: opts.debugSql ? ['query'] : false,
    ...(opts.logger ? { logger: opts.logger } : {}),
    // A failed statement's message must not carry the values (knex otherwise writes them into it).
    driverOptions: { compileSqlOnError: false },
    migrations: {
      path: migrationsDir,
      pathTs: migrationsDir,
      migrationsList,
      emit: 'ts',
      transactional: true,
      allOrNothing: true,
      snapshot: false,
      silent: true,
      fileName: (timestamp: string, name?: string) => `Migration${timestamp}${name ? `_${name}` : ''}`,
    },
  };
}

/** Opens (creating the folder if needed) and migrates the database. */
export async function openDatabase(
  databasePath: string,
  options: { migrate?: boolean; debugSql?: boolean; logger?: (message: string) => void } = {},
): Promise<Orm> {
  if (databasePath !== ':memory:') mkdirSync(dirname(resolve(databasePath)), { recursive: true });
  const orm = await MikroORM.init<BetterSqliteDriver>(ormOptions(databasePath, options));
  if (options.migrate !== false) {
    await orm.getMigrator().up();
  }
  return orm;
}
