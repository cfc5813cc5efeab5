import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';

export type RunnerKind = 'embedded' | 'remote';

/** What a runner reported about one of its jobs in its last heartbeat. */
export interface RunnerReportedJob {
  runId: string;
  step: number;
  stepsPerSecond: number | null;
}

/**
 * A runner: an `npm run runner` process with a token (`remote`), or the server's own runner threads
 * (`embedded`, one row, whose token is replaced at every start). Only the SHA-256 hash of the token is stored.
 */
export class Runner {
  [OptionalProps]?: 'id' | 'revokedAt' | 'lastHeartbeatAt' | 'threads' | 'jobsDone' | 'reportedJobs' | 'stepsPerSecond' | 'createdAt';
  id: string = randomUUID();
  name!: string;
  kind!: RunnerKind;
  tokenHash!: string;
  createdAt: Date = new Date();
  revokedAt: Date | null = null;
  lastHeartbeatAt: Date | null = null;
  threads: number | null = null;
  jobsDone = 0;
  /** Jobs and throughput of the last heartbeat. */
  reportedJobs: RunnerReportedJob[] = [];
  stepsPerSecond: number | null = null;
}

export const RunnerSchema = new EntitySchema<Runner>({
  class: Runner,
  tableName: 'runners',
  properties: {
    id: { type: 'uuid', primary: true },
    name: { type: 'string', length: 80 },
    kind: { type: 'string', length: 8 },
    tokenHash: { type: 'string', length: 64, unique: true },
    createdAt: { type: 'datetime' },
    revokedAt: { type: 'datetime', nullable: true },
    lastHeartbeatAt: { type: 'datetime', nullable: true },
    threads: { type: 'integer', nullable: true },
    jobsDone: { type: 'integer', default: 0 },
    reportedJobs: { type: 'json' },
    stepsPerSecond: { type: 'double', nullable: true },
  },
});
