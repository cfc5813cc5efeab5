import { afterEach, describe, expect, it } from 'vitest';
import { MikroORM } from '@mikro-orm/core';
import type { BetterSqliteDriver } from '@mikro-orm/better-sqlite';
import { ormOptions } from './orm';

let orm: MikroORM<BetterSqliteDriver> | null = null;
afterEach(async () => { await orm?.close(true); orm = null; });

const now = '2026-12-01T00:00:00.000Z';
const runSql = (id: string, family: string, settings: unknown) =>
  `insert into runs (id, bench_id, name, family, settings, alphabet, status, summary, created_at, updated_at) values ('${id}', 'b1', 'r', '${family}', '${JSON.stringify(settings)}', '[]', 'finished', '{}', '${now}', '${now}')`;

describe('migration Migration20261205103000_settings_keys_g', () => {
  it('rewrites the GRU settings keys of stored runs and grids, and leaves everything else alone', async () => {
    orm = await MikroORM.init<BetterSqliteDriver>(ormOptions(':memory:'));
    const migrator = orm.getMigrator();
    await migrator.up({ to: 'Migration20261202033904_evaluations_grids_reports' });
    const conn = orm.em.fork().getConnection();
    await conn.execute('pragma foreign_keys = off');
    const training = { steps: 10, batchSize: 4 };
    await conn.execute(runSql('old', 'gru', { model: { stateSize: 8, embedSize: 4, obsHidden: 2 }, training }));
    await conn.execute(runSql('ssm', 'ssm', { model: { stateSize: 8, embeddingSize: 16, observationHidden: 0 }, training }));
    await conn.execute(runSql('new', 'gru', { model: { stateSize: 8, embeddingSize: 5, observationHidden: 0 }, training }));
    await conn.execute(`insert into grids (id, bench_id, name, kind, family, axes, base_settings, figure, created_at) values ('g1', 'b1', 'g', 'grid', 'gru', '${JSON.stringify([{ key: 'model.embedSize', values: [4, 8] }])}', '${JSON.stringify({ model: { embedSize: 4, obsHidden: 0 }, training })}', 'held-out', '${now}')`);

    await migrator.up();
    const rows: { id: string; settings: string }[] = await conn.execute('select id, settings from runs order by id');
    const model = (id: string) => JSON.parse(rows.find((r) => r.id === id)!.settings).model;
    expect(model('old')).toEqual({ stateSize: 8, embeddingSize: 4, observationHidden: 2 });
    expect(model('ssm')).toEqual({ stateSize: 8, embeddingSize: 16, observationHidden: 0 });
    expect(model('new')).toEqual({ stateSize: 8, embeddingSize: 5, observationHidden: 0 });
    expect(JSON.parse(rows.find((r) => r.id === 'old')!.settings).training).toEqual(training);
    const [grid]: { axes: string; base_settings: string }[] = await conn.execute('select axes, base_settings from grids');
    expect(JSON.parse(grid!.axes)).toEqual([{ key: 'model.embeddingSize', values: [4, 8] }]);
    expect(JSON.parse(grid!.base_settings).model).toEqual({ embeddingSize: 4, observationHidden: 0 });

    // Back to the migration before this one (later ones, appended after it, are undone too).
    await migrator.down({ to: 'Migration20261205102200_runners_b' });
    const back: { settings: string }[] = await conn.execute(`select settings from runs where id = 'old'`);
    expect(JSON.parse(back[0]!.settings).model).toEqual({ stateSize: 8, embedSize: 4, obsHidden: 2 });
  });
});
