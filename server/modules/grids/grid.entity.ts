import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import type { GridAxis, GridFigure, GridKind } from '../../../shared/api/grids';
import type { RunFamily } from '../../../shared/api/runs';
import { Bench } from '../benches/bench.entity';
import { Corpus } from '../corpora/corpus.entity';
import { User } from '../users/user.entity';

/**
 * A grid of runs over up to three setting axes, or a learnability check (kind `learnability`, one axis
 * `model`). The runs point back at it (`runs.grid_id`, `runs.grid_cell`); `family` is null for a check.
 * `budgetSteps` is the fixed training budget of a check (null for a plain grid).
 */
export class Grid {
  [OptionalProps]?: 'id' | 'createdAt' | 'budgetSteps';
  id: string = randomUUID();
  bench!: Bench;
  corpus!: Corpus | null;
  name!: string;
  kind!: GridKind;
  family!: RunFamily | null;
  axes!: GridAxis[];
  baseSettings!: Record<string, unknown>;
  figure!: GridFigure;
  budgetSteps: number | null = null;
  createdBy!: User | null;
  createdAt: Date = new Date();
}

export const GridSchema = new EntitySchema<Grid>({
  class: Grid,
  tableName: 'grids',
  indexes: [{ properties: ['bench', 'createdAt'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    bench: { kind: 'm:1', entity: () => Bench, deleteRule: 'cascade' },
    corpus: { kind: 'm:1', entity: () => Corpus, nullable: true, deleteRule: 'set null' },
    name: { type: 'string', length: 120 },
    kind: { type: 'string', length: 16 },
    family: { type: 'string', length: 8, nullable: true },
    axes: { type: 'json' },
    baseSettings: { type: 'json' },
    figure: { type: 'string', length: 40 },
    budgetSteps: { type: 'integer', nullable: true },
    createdBy: { kind: 'm:1', entity: () => User, nullable: true, deleteRule: 'set null' },
    createdAt: { type: 'datetime' },
  },
});
