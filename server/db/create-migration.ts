/**
 * `npm run db:migration:create -- [name]`: writes a new migration into server/migrations with the
 * difference between the entity definitions and a scratch database migrated to the current list.
 * Add the new class to server/db/migrations.ts afterwards.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { openDatabase } from './orm';

const name = process.argv[2] ?? 'change';
const dir = mkdtempSync(join(tmpdir(), 'noisewright-migration-'));
const orm = await openDatabase(join(dir, 'scratch.sqlite'));
try {
  const result = await orm.getMigrator().createMigration(undefined, false, false, name);
  if (result.diff.up.length === 0) {
    console.log('No schema changes: the entities match the migrations.');
  } else {
    console.log(`Wrote server/migrations/${result.fileName}. Add it to server/db/migrations.ts.`);
  }
} finally {
  await orm.close(true);
  rmSync(dir, { recursive: true, force: true });
}
