/**
 * `npx tsx bench/wal-ab.ts`: SQLite rollback journal (DELETE) against WAL for the server's commonest write
 * (a metric batch: 200 points in one transaction) and read (a page of points), interleaved A/B in one
 * process, synchronous = FULL in both. Prints the median time per operation of each mode.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';

type Db = { pragma(s: string): unknown; exec(s: string): void; prepare(s: string): { run(...a: unknown[]): unknown; all(...a: unknown[]): unknown[] }; transaction<T extends (...a: never[]) => unknown>(f: T): T; close(): void };
const Database = createRequire(import.meta.url)('better-sqlite3') as new (path: string) => Db;

const dir = mkdtempSync(join(tmpdir(), 'noisewright-wal-'));
function open(mode: 'delete' | 'wal'): Db {
  const db = new Database(join(dir, `${mode}.sqlite`));
  db.pragma(`journal_mode = ${mode}`);
  db.pragma('synchronous = full');
  db.exec('create table if not exists metric_points (run_id text, series text, step integer, value real, unique (run_id, series, step))');
  return db;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

const dbs = { delete: open('delete'), wal: open('wal') };
const times: Record<'delete' | 'wal', { write: number[]; read: number[] }> = { delete: { write: [], read: [] }, wal: { write: [], read: [] } };
for (let round = 0; round < 200; round++) {
  for (const mode of round % 2 === 0 ? (['delete', 'wal'] as const) : (['wal', 'delete'] as const)) {
    const db = dbs[mode];
    const insert = db.prepare('insert into metric_points values (?, ?, ?, ?) on conflict (run_id, series, step) do update set value = excluded.value');
    const batch = db.transaction(() => {
      for (let i = 0; i < 200; i++) insert.run('run', 'train_bound', round * 200 + i, Math.random());
    });
    let t = performance.now();
    batch();
    times[mode].write.push(performance.now() - t);
    t = performance.now();
    db.prepare('select step, value from metric_points where run_id = ? and series = ? and step > ? order by step limit 1000').all('run', 'train_bound', round * 100);
    times[mode].read.push(performance.now() - t);
  }
}
for (const db of Object.values(dbs)) db.close();
rmSync(dir, { recursive: true, force: true });
console.log(`load average ${loadavg().map((x) => x.toFixed(1)).join(' ')}`);
for (const mode of ['delete', 'wal'] as const) {
  console.log(`${mode.padEnd(6)} batch of 200 points: median ${median(times[mode].write).toFixed(2)} ms; page of 1000 points: median ${median(times[mode].read).toFixed(2)} ms`);
}
