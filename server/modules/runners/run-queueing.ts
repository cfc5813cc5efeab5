/**
 * The two things every change of a run does after it is written: put a runner run that became `queued` on
 * the queue (with its fairness priority, waking the claims that wait for work) or take one that stopped waiting
 * off it, and publish the change on the event bus (server-sent events).
 */
import { wrap, type EntityManager } from '@mikro-orm/core';
import type { AppContext } from '../../app-context';
import type { Run } from '../runs/run.entity';
import { toRunDto } from '../runs/run.repository';

/** Waiting runner runs of a bench (queued, no live lease), leaving out `except`. */
async function waitingInBench(em: EntityManager, benchId: string, except: readonly string[]): Promise<number> {
  const params: unknown[] = [benchId, ...except];
  const rows: { n: number }[] = await em
    .getConnection()
    .execute(
      `select count(*) as n from runs where bench_id = ? and placement = 'runners' and status = 'queued' and runner_id is null` +
        (except.length > 0 ? ` and id not in (${except.map(() => '?').join(',')})` : ''),
      params,
    );
  return Number(rows[0]?.n ?? 0);
}

/** Adds runner runs that became `queued` to the queue; priority 1 + the bench's runs already waiting. */
export async function queueForRunners(ctx: AppContext, em: EntityManager, runs: readonly Run[]): Promise<void> {
  const mine = runs.filter((r) => r.placement === 'runners' && r.status === 'queued');
  if (mine.length === 0) return;
  const byBench = new Map<string, Run[]>();
  for (const r of mine) byBench.set(r.bench.id, [...(byBench.get(r.bench.id) ?? []), r]);
  const queued = [];
  for (const [benchId, list] of byBench) {
    let waiting = await waitingInBench(em, benchId, list.map((r) => r.id));
    for (const r of list) queued.push({ runId: r.id, benchId, priority: 1 + waiting++ });
  }
  await ctx.runQueue.enqueue(queued);
  // Runners whose claims wait for work (embedded back-end) claim again now.
  ctx.runnerWakeup.notify();
}

/**
 * Publishes a run's new state on the bus (`run` event; `canControl` is filled per listener). Nothing to do (no
 * query, no DTO) while no stream of the bench is open; otherwise the corpus and creator names are loaded when
 * the caller did not load them.
 */
export async function publishRun(ctx: AppContext, em: EntityManager, run: Run): Promise<void> {
  if (ctx.runEvents.listenerCount(run.bench.id) === 0) return;
  const missing = (['corpus', 'createdBy'] as const).filter((k) => run[k] && !wrap(run[k]).isInitialized());
  if (missing.length > 0) await em.populate(run, missing);
  const rows: { n: number }[] = await em.getConnection().execute('select count(*) as n from checkpoints where run_id = ?', [run.id]);
  ctx.runEvents.publish({ name: 'run', benchId: run.bench.id, runId: run.id, data: toRunDto(run, Number(rows[0]?.n ?? 0), false) });
}
