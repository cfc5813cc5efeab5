import type { EntityManager } from '@mikro-orm/better-sqlite';
import type { MetricSeriesPage } from '../../../shared/api/runs';
import type { Run } from './run.entity';

export interface MetricPointInput {
  series: string;
  step: number;
  value: number;
}

/** Rows per INSERT statement (5 bound values each, well under SQLite's variable limit). */
const ROWS_PER_STATEMENT = 500;

/** Metric points: batch appends (one transaction) and compact reads. */
export class MetricRepository {
  constructor(private readonly em: EntityManager) {}

  /**
   * Writes every point in one transaction; a point for a (series, step) the run already has replaces
   * the stored value (a run resumed from an earlier checkpoint writes those steps again).
   */
  async append(run: Run, points: readonly MetricPointInput[]): Promise<void> {
    await this.em.transactional(async (em) => {
      for (let i = 0; i < points.length; i += ROWS_PER_STATEMENT) {
        const chunk = points.slice(i, i + ROWS_PER_STATEMENT);
        const params: (string | number)[] = [];
        for (const p of chunk) params.push(run.id, p.series, p.step, p.value);
        await em.execute(
          `insert into metric_points (run_id, series, step, value) values ${chunk.map(() => '(?, ?, ?, ?)').join(', ')} ` +
            'on conflict (run_id, series, step) do update set value = excluded.value',
          params,
          'run',
        );
      }
    });
  }

  /** Points with step > sinceStep, per series in step order, at most `limit` per series. */
  async read(run: Run, query: { series: string[]; sinceStep: number; limit: number }): Promise<MetricSeriesPage> {
    const names =
      query.series.length > 0
        ? query.series
        : (await this.em.execute<{ series: string }[]>('select distinct series from metric_points where run_id = ? order by series', [run.id])).map(
            (r) => r.series,
          );
    const page: MetricSeriesPage = { series: {}, truncated: false };
    for (const name of names) {
      const rows = await this.em.execute<{ step: number; value: number }[]>(
        'select step, value from metric_points where run_id = ? and series = ? and step > ? order by step limit ?',
        [run.id, name, query.sinceStep, query.limit + 1],
      );
      if (rows.length > query.limit) {
        page.truncated = true;
        rows.length = query.limit;
      }
      page.series[name] = { steps: rows.map((r) => Number(r.step)), values: rows.map((r) => Number(r.value)) };
    }
    return page;
  }

  /** Removes the points after a step (before a run resumes from an earlier checkpoint); returns how many. */
  async truncateAfter(run: Run, afterStep: number): Promise<number> {
    const result = await this.em.execute<{ changes: number }>('delete from metric_points where run_id = ? and step > ?', [run.id, afterStep], 'run');
    return Number((result as unknown as { affectedRows?: number; changes?: number }).affectedRows ?? (result as { changes?: number }).changes ?? 0);
  }
}
