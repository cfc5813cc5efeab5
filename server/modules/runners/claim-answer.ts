/** How a runner's claim is answered, for training runs and evaluation requests alike, and how a claim waits for work. */
import type { Response } from 'express';
import type { RunHeldErrorBody } from '../../../shared/api/runner-jobs';
import type { AppContext } from '../../app-context';
import { currentRequestSignal } from '../../middleware/client-gone';
import { leaveRequestLine } from '../../middleware/request-gate';
import { RunHeldError } from './runner-job.service';

/** The claimed job as JSON, 204 when nothing waits, or 409 RUN_HELD with `Retry-After` when another runner holds it. */
export async function answerClaim(res: Response, claim: () => Promise<object | null>): Promise<void> {
  try {
    const job = await claim();
    if (!job) {
      res.status(204).end();
      return;
    }
    res.json(job);
  } catch (error) {
    if (!(error instanceof RunHeldError)) throw error;
    const body: RunHeldErrorBody = { error: { code: 'RUN_HELD', message: error.message, retryAfterSeconds: error.retryAfterSeconds } };
    res.status(409).set('Retry-After', String(error.retryAfterSeconds)).json(body);
  }
}

/**
 * A claim that waits for work (`waitSeconds` > 0): claims at once; when that gives nothing, gives its place in the
 * request line back and waits until work may be there (`ctx.runnerWakeup`: a run queued for runners, an evaluation
 * request waiting), the wait ends, the client goes away or the server shuts down. After a wake it claims once more
 * and gives what that gives (null, e.g. when the new work was an evaluation: the runner claims that itself). A job
 * claimed for a client that went away meanwhile is handed back with `giveBack`.
 */
export async function claimWaiting<T>(
  ctx: AppContext,
  res: Response,
  waitSeconds: number,
  claim: () => Promise<T | null>,
  giveBack: (job: T) => Promise<void>,
): Promise<T | null> {
  // Taken before the claim: work queued while the claim reads the database still ends the wait at once.
  const mark = ctx.runnerWakeup.mark();
  const job = await claim();
  if (job || waitSeconds <= 0) return job;
  leaveRequestLine(res);
  const gone = currentRequestSignal();
  const reason = await ctx.runnerWakeup.waitAfter(mark, waitSeconds * 1000, gone);
  if (reason !== 'work') return null;
  const next = await claim();
  if (next && gone?.aborted) {
    await giveBack(next);
    return null;
  }
  return next;
}
