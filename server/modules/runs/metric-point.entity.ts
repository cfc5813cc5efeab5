import { EntitySchema } from '@mikro-orm/core';
import { Run } from './run.entity';

/**
 * One value of one curve of a run (e.g. `train_bound` at step 120). Written in batches by raw inserts
 * (see MetricRepository); a later point for the same run, series and step replaces the earlier one.
 */
export class MetricPoint {
  id!: number;
  run!: Run;
  series!: string;
  step!: number;
  value!: number;
}

export const MetricPointSchema = new EntitySchema<MetricPoint>({
  class: MetricPoint,
  tableName: 'metric_points',
  uniques: [{ properties: ['run', 'series', 'step'] }],
  properties: {
    id: { type: 'integer', primary: true, autoincrement: true },
    run: { kind: 'm:1', entity: () => Run, deleteRule: 'cascade', index: false },
    series: { type: 'string', length: 40 },
    step: { type: 'integer' },
    value: { type: 'double' },
  },
});
