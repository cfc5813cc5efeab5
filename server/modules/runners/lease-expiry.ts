/**
 * Runs whose runner stopped answering: a runner run that is `training` under a lease that ran out (no progress
 * or heartbeat for RUNNER_LEASE_SECONDS: the runner was killed, lost its network, or its machine slept) goes
 * back to `queued` with no holder and a reason that says so, as soon as the server sees it (every few
 * seconds), instead of showing `training` until another runner claims it. The change is published on the
 * event streams and the run is queued again; the next runner resumes it from its latest checkpoint. A runner
 * that comes back later gets 409 RUN_NOT_HELD on its next call and leaves the run alone. The rule itself is
 * `RunnerJobService.releaseExpired`, beside the claim and release rules.
 */
import type { AppContext } from '../../app-context';
import { EvaluationJobService } from '../evaluation-jobs/evaluation-job.service';
import { RunnerJobService } from './runner-job.service';

/** How often the server looks for runs whose lease ran out. */
export const LEASE_CHECK_EVERY_MS = 5000;

/** Puts every runner run whose lease ran out back in the queue; returns how many. */
export async function expireLeases(ctx: AppContext): Promise<number> {
  const runs = await new RunnerJobService(ctx, ctx.orm.em.fork()).releaseExpired();
  // Evaluation requests follow the same lease rule (they wait again for another runner).
  return runs + (await new EvaluationJobService(ctx, ctx.orm.em.fork()).releaseExpired());
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
