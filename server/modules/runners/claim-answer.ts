/** How a runner's claim is answered, for training runs and evaluation requests alike. */
import type { Response } from 'express';
import type { RunHeldErrorBody } from '../../../shared/api/runner-jobs';
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
