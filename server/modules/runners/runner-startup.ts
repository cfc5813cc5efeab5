/**
 * What the server does for runners when it starts: a fresh token for its embedded runner threads, the runs
 * those threads held before a restart given back to the queue (they resume from their latest checkpoint),
 * and — with BullMQ — a job for every runner run that waits without one (Redis was emptied, or a resume
 * raced with the end of the old job).
 */
import type { EntityManager } from '@mikro-orm/better-sqlite';
import type { Clock } from '../../clock';
import type { Orm } from '../../db/orm';
import type { RunQueue } from './queue/run-queue';
import { Runner } from './runner.entity';
import { RunnerRepository } from './runner.repository';

/** Gives the runs the embedded runner's threads held before this start back to the queue (when threads are off). */
export async function releaseEmbeddedRuns(orm: Orm): Promise<number> {
  const em = orm.em.fork();
  const runner = await em.findOne(Runner, { kind: 'embedded' });
  return runner ? releaseRunsOf(em, runner.id) : 0;
}

/** Gives the embedded runner's runs back to the queue and returns a new token for its threads. */
export async function prepareEmbeddedRunner(orm: Orm, clock: Clock): Promise<{ runnerId: string; token: string; released: number }> {
  const em = orm.em.fork();
  const { runner, token } = await new RunnerRepository(em).embeddedWithNewToken(clock.now());
  await em.flush();
  const released = await releaseRunsOf(em, runner.id);
  return { runnerId: runner.id, token, released };
}

/** Runs a runner held (it is gone): back to `queued`, no holder, no lease. Returns how many. */
export async function releaseRunsOf(em: EntityManager, runnerId: string): Promise<number> {
  const result = await em.execute(
    "update runs set status = 'queued', runner_id = null, lease_expires_at = null, requested_control = null where runner_id = ? and status in ('queued', 'training')",
    [runnerId],
    'run',
  );
  // Its evaluation requests wait again too (a runner starts an evaluation over).
  await em.execute("update evaluation_requests set status = 'waiting', runner_id = null, lease_expires_at = null, stage = null where runner_id = ? and status = 'running'", [runnerId], 'run');
  return Number((result as { affectedRows?: number; changes?: number }).affectedRows ?? (result as { changes?: number }).changes ?? 0);
}

/** Adds a job for every waiting runner run the queue has none for (BullMQ); returns how many were added. */
export async function ensureQueuedJobs(orm: Orm, queue: RunQueue): Promise<number> {
  if (queue.backend !== 'bullmq') return 0;
  const em = orm.em.fork();
  const evaluations = await ensureQueuedEvaluations(em, queue);
  const rows: { id: string; bench_id: string }[] = await em
    .getConnection()
    .execute("select id, bench_id from runs where placement = 'runners' and status = 'queued' and archived = 0 and runner_id is null order by created_at, id");
  if (rows.length === 0) return evaluations;
  const present = (await queue.jobsWaitingFor(rows.map((r) => r.id))) ?? new Set<string>();
  const perBench = new Map<string, number>();
  const missing = [];
  for (const row of rows) {
    const n = (perBench.get(row.bench_id) ?? 0) + 1;
    perBench.set(row.bench_id, n);
    if (!present.has(row.id)) missing.push({ runId: row.id, benchId: row.bench_id, priority: n });
  }
  await queue.enqueue(missing);
  return evaluations + missing.length;
}

/** Adds an `evaluate` job for every waiting evaluation request the queue has none for; returns how many. */
async function ensureQueuedEvaluations(em: EntityManager, queue: RunQueue): Promise<number> {
  const rows: { id: string; run_id: string; bench_id: string }[] = await em
    .getConnection()
    .execute("select id, run_id, bench_id from evaluation_requests where status = 'waiting' order by created_at, id");
  if (rows.length === 0) return 0;
  const present = (await queue.evaluationJobsFor(rows.map((r) => r.id))) ?? new Set<string>();
  const missing = rows.filter((r) => !present.has(r.id)).map((r) => ({ requestId: r.id, runId: r.run_id, benchId: r.bench_id }));
  await queue.enqueueEvaluations(missing);
  return missing.length;
}
