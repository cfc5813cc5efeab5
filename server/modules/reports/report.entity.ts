import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import type { ReportKind, ReportSnapshot } from '../../../shared/api/reports';
import { Bench } from '../benches/bench.entity';
import { User } from '../users/user.entity';

/** A frozen report: the figures of an evaluation, a comparison or a grid at the time it was made. */
export class Report {
  [OptionalProps]?: 'id' | 'createdAt';
  id: string = randomUUID();
  bench!: Bench;
  kind!: ReportKind;
  title!: string;
  sourceIds!: string[];
  snapshot!: ReportSnapshot;
  createdBy!: User | null;
  createdAt: Date = new Date();
}

export const ReportSchema = new EntitySchema<Report>({
  class: Report,
  tableName: 'reports',
  indexes: [{ properties: ['bench', 'createdAt'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    bench: { kind: 'm:1', entity: () => Bench, deleteRule: 'cascade' },
    kind: { type: 'string', length: 16 },
    title: { type: 'string', length: 160 },
    sourceIds: { type: 'json' },
    snapshot: { type: 'json', lazy: true },
    createdBy: { kind: 'm:1', entity: () => User, nullable: true, deleteRule: 'set null' },
    createdAt: { type: 'datetime' },
  },
});
