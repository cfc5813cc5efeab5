import type { EntityManager } from '@mikro-orm/core';
import { RUNNER_LEASE_SECONDS, RUNNER_ONLINE_SECONDS } from '../../../shared/api/runner-jobs';
import type { RunnerDto } from '../../../shared/api/runners';
import { EvaluationRequest } from '../evaluation-jobs/evaluation-request.entity';
import { Run } from '../runs/run.entity';
import { Runner, type RunnerKind } from './runner.entity';
import { hashRunnerToken, newRunnerToken } from './runner-tokens';

/** The name of the runner row that stands for the server's own runner threads. */
export const EMBEDDED_RUNNER_NAME = 'This server';

export function isOnline(runner: Runner, now: Date): boolean {
  return !runner.revokedAt && runner.lastHeartbeatAt !== null && now.getTime() - runner.lastHeartbeatAt.getTime() <= RUNNER_ONLINE_SECONDS * 1000;
}

export function leaseUntil(now: Date): Date {
  return new Date(now.getTime() + RUNNER_LEASE_SECONDS * 1000);
}

export function toRunnerDto(runner: Runner, held: readonly Run[], now: Date, evaluating: readonly EvaluationRequest[] = []): RunnerDto {
  const jobs = held.map((run) => ({
    runId: run.id,
    runName: run.name,
    benchId: run.bench.id,
    benchName: run.bench.name,
    step: run.live?.step ?? run.stepsDone,
    steps: run.live?.steps ?? 0,
    stepsPerSecond: run.live?.stepsPerSecond ?? null,
  }));
  return {
    id: runner.id,
    name: runner.name,
    kind: runner.kind,
    createdAt: runner.createdAt.toISOString(),
    revokedAt: runner.revokedAt?.toISOString() ?? null,
    lastHeartbeatAt: runner.lastHeartbeatAt?.toISOString() ?? null,
    online: isOnline(runner, now),
    threads: runner.threads,
    currentJobs: jobs,
    currentEvaluations: evaluating.map((q) => ({
      requestId: q.id, runId: q.run.id, runName: q.run.name, benchId: q.bench.id, benchName: q.bench.name, checkpointStep: q.checkpointStep, stage: q.stage,
    })),
    stepsPerSecond: runner.stepsPerSecond,
    jobsDone: runner.jobsDone,
  };
}

export class RunnerRepository {
  constructor(private readonly em: EntityManager) {}

  findByToken(token: string): Promise<Runner | null> {
    return this.em.findOne(Runner, { tokenHash: hashRunnerToken(token) });
  }

  findById(id: string): Promise<Runner | null> {
    return this.em.findOne(Runner, { id });
  }

  /** A new runner and its token (the only time the token exists outside the runner). */
  create(name: string, kind: RunnerKind, at: Date): { runner: Runner; token: string } {
    const token = newRunnerToken();
    const runner = this.em.create(Runner, { name, kind, tokenHash: hashRunnerToken(token), createdAt: at, reportedJobs: [] });
    return { runner, token };
  }

  /** The embedded runner row (created once), with a fresh token for this start of the server. */
  async embeddedWithNewToken(at: Date): Promise<{ runner: Runner; token: string }> {
    const existing = await this.em.findOne(Runner, { kind: 'embedded' });
    if (!existing) return this.create(EMBEDDED_RUNNER_NAME, 'embedded', at);
    const token = newRunnerToken();
    existing.tokenHash = hashRunnerToken(token);
    existing.revokedAt = null;
    return { runner: existing, token };
  }

  listAll(): Promise<Runner[]> {
    return this.em.find(Runner, {}, { orderBy: { revokedAt: 'asc', createdAt: 'asc', id: 'asc' } });
  }

  /** Evaluation requests runners compute now (lease not expired), with their run and bench. */
  heldEvaluations(now: Date): Promise<EvaluationRequest[]> {
    return this.em.find(EvaluationRequest, { status: 'running', runner: { $ne: null }, leaseExpiresAt: { $gt: now } },
      { populate: ['run', 'bench', 'runner'], orderBy: { createdAt: 'asc', id: 'asc' } });
  }

  /** Runs runners hold now (lease not expired), with their bench. */
  heldRuns(now: Date, runner?: Runner): Promise<Run[]> {
    return this.em.find(
      Run,
      { placement: 'runners', runner: runner ? runner : { $ne: null }, leaseExpiresAt: { $gt: now } },
      { populate: ['bench'], orderBy: { createdAt: 'asc', id: 'asc' } },
    );
  }

  /** Evaluation requests waiting for a runner (not yet claimed), over all benches. */
  async evaluationsWaiting(): Promise<number> {
    return this.em.count(EvaluationRequest, { status: 'waiting' });
  }

  /** Runs waiting for a runner (queued) and being trained by one, over all benches or one. */
  async queueCounts(benchId?: string): Promise<{ waiting: number; active: number }> {
    const where = benchId ? ' and bench_id = ?' : '';
    const params = benchId ? [benchId] : [];
    const rows: { status: string; n: number }[] = await this.em
      .getConnection()
      .execute(`select status, count(*) as n from runs where placement = 'runners' and archived = 0 and status in ('queued', 'training')${where} group by status`, params);
    const of = (s: string) => Number(rows.find((r) => r.status === s)?.n ?? 0);
    return { waiting: of('queued'), active: of('training') };
  }
}
