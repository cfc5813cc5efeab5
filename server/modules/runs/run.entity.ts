import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import type { RunLiveProgress, RunPlacement } from '../../../shared/api/runners';
import type { RunFamily, RunSettings, RunStatus, RunSummary } from '../../../shared/api/runs';
import { Bench } from '../benches/bench.entity';
import { Corpus } from '../corpora/corpus.entity';
import { Grid } from '../grids/grid.entity';
import { Runner } from '../runners/runner.entity';
import { User } from '../users/user.entity';

/**
 * A training run of one model on one corpus. Settings are stored as validated (with the split that
 * applies); the alphabet is copied from the corpus so checkpoints can be checked even after the corpus
 * is gone (the corpus link is then null). `bestBoundBitsPerChar` mirrors the summary's best validation
 * bound so the list can sort by it.
 */
export class Run {
  [OptionalProps]?: 'id' | 'statusReason' | 'summary' | 'stepsDone' | 'archived' | 'bestBoundBitsPerChar' | 'createdAt' | 'updatedAt' | 'grid' | 'gridCell'
    | 'placement' | 'runner' | 'leaseExpiresAt' | 'live' | 'requestedControl';
  id: string = randomUUID();
  bench!: Bench;
  corpus!: Corpus | null;
  createdBy!: User | null;
  name!: string;
  family!: RunFamily;
  settings!: RunSettings;
  alphabet!: string[];
  status!: RunStatus;
  statusReason: string | null = null;
  summary: RunSummary = {};
  stepsDone = 0;
  archived = false;
  bestBoundBitsPerChar: number | null = null;
  /** The grid or learnability check this run is a cell of (server/modules/grids), with its coordinates. */
  grid: Grid | null = null;
  gridCell: number[] | null = null;
  /** Where it trains (shared/api/runners.ts); runner runs are queued on the server (server/modules/runners). */
  placement: RunPlacement = 'tab';
  /** The runner holding it, until `leaseExpiresAt` (renewed by its heartbeats and progress calls). */
  runner: Runner | null = null;
  leaseExpiresAt: Date | null = null;
  /** Latest progress a runner reported. */
  live: RunLiveProgress | null = null;
  /** A pause or stop asked for while a runner holds the run; the runner sees it in its next progress answer. */
  requestedControl: 'pause' | 'stop' | null = null;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const RunSchema = new EntitySchema<Run>({
  class: Run,
  tableName: 'runs',
  indexes: [{ properties: ['bench', 'createdAt'] }, { properties: ['bench', 'status'] }, { properties: ['placement', 'status'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    bench: { kind: 'm:1', entity: () => Bench, deleteRule: 'cascade' },
    corpus: { kind: 'm:1', entity: () => Corpus, nullable: true, deleteRule: 'set null' },
    createdBy: { kind: 'm:1', entity: () => User, nullable: true, deleteRule: 'set null' },
    name: { type: 'string', length: 120 },
    family: { type: 'string', length: 8 },
    settings: { type: 'json' },
    alphabet: { type: 'json' },
    status: { type: 'string', length: 16 },
    statusReason: { type: 'text', nullable: true },
    summary: { type: 'json' },
    stepsDone: { type: 'integer', default: 0 },
    archived: { type: 'boolean', default: false },
    bestBoundBitsPerChar: { type: 'double', nullable: true },
    grid: { kind: 'm:1', entity: () => Grid, nullable: true, deleteRule: 'set null' },
    gridCell: { type: 'json', nullable: true },
    placement: { type: 'string', length: 8, default: 'tab' },
    runner: { kind: 'm:1', entity: () => Runner, nullable: true, deleteRule: 'set null' },
    leaseExpiresAt: { type: 'datetime', nullable: true },
    live: { type: 'json', nullable: true },
    requestedControl: { type: 'string', length: 8, nullable: true },
    createdAt: { type: 'datetime' },
    updatedAt: { type: 'datetime', onUpdate: () => new Date() },
  },
});
