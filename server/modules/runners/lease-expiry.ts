/**
 * Runs whose runner stopped answering: a runner run that is `training` under a lease that ran out (no progress
 * or heartbeat for RUNNER_LEASE_SECONDS: the runner was killed, lost its network, or its machine slept) goes
 * back to `queued` with no holder and a reason that says so, as soon as the server sees it (every few
 * seconds), instead of showing `training` until another runner claims it. The change is published on the
 * event streams and the run is queued again; the next runner resumes it from its latest checkpoint. A runner
 * that comes back later gets 409 RUN_NOT_HELD on its next call and leaves the run alone.
 */
import type { AppContext } from '../../app-context';
import { Run } from '../runs/run.entity';
import { RunService } from '../runs/run.service';

/** How often the server looks for runs whose lease ran out. */
export const LEASE_CHECK_EVERY_MS = 5000;

/** Puts every runner run whose lease ran out back in the queue; returns how many. */
export async function expireLeases(ctx: AppContext): Promise<number> {
  const em = ctx.orm.em.fork();
  const now = ctx.clock.now();
  const expired = await em.find(Run, { placement: 'runners', status: 'training', runner: { $ne: null }, leaseExpiresAt: { $lte: now } }, { populate: ['runner'] });
  const runs = new RunService(ctx, em);
  let released = 0;
  for (const run of expired) {
    await runs.locked(run, async () => {
      // Read again under the lock: a progress call may have renewed the lease meanwhile.
      if (run.status !== 'training' || !run.runner || !run.leaseExpiresAt || run.leaseExpiresAt > ctx.clock.now()) return;
      const name = run.runner.name ?? 'runner';
      const since = run.leaseExpiresAt.toISOString().slice(11, 19);
      runs.applyStatus(run, {
        status: 'queued',
        statusReason: `The runner "${name}" stopped answering (no word since its lease ran out at ${since} UTC); waiting for a runner, which resumes from the latest checkpoint.`,
        actor: null,
      });
      await em.flush();
      await runs.afterChange(run, 'training');
      released++;
    });
  }
  return released;
}

/** Checks for expired leases every LEASE_CHECK_EVERY_MS; returns the function that stops the checks. */
export function watchLeases(ctx: AppContext, everyMs = LEASE_CHECK_EVERY_MS): () => void {
  let busy = false;
  const timer = setInterval(() => {
    if (busy) return;
    busy = true;
    void expireLeases(ctx).catch((error: unknown) => ctx.logError(error)).finally(() => { busy = false; });
  }, everyMs);
  timer.unref();
  return () => clearInterval(timer);
}
