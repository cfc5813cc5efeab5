/**
 * Evaluations sent to runners, seen from the bench. Under /api/benches/:benchId/runs:
 * `/:runId/checkpoints/:checkpointId/evaluation-requests` POST ask (member and up, who may control the run),
 * GET list (viewer). Under /api/benches/:benchId/evaluation-requests: `/:requestId` GET one (viewer; the page
 * polls it), DELETE withdraws one that waits or failed (who may control its run; 409 while a runner computes it). Asking twice for the same checkpoint and settings returns the request that waits or runs (200); a
 * stored evaluation with those settings is a 409 EVALUATION_EXISTS that carries it, as for a tab's figures.
 */
import { Router } from 'express';
import { createEvaluationRequestSchema } from '../../../shared/api/evaluation-jobs';
import type { AppContext } from '../../app-context';
import { notFound } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { parseBody } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { checkBaselineRun, evaluationExistsBody } from '../evaluations/evaluation-store';
import { EvaluationRepository } from '../evaluations/evaluation.repository';
import { loadCheckpoint } from '../evaluations/evaluations.routes';
import { loadRun, requireControl } from '../runs/run-access';
import { EvaluationJobService, toEvaluationRequestDto } from './evaluation-job.service';

/** Routes under /api/benches/:benchId/runs. */
export function checkpointEvaluationRequestRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  const jobs = () => new EvaluationJobService(ctx);
  const base = '/:runId/checkpoints/:checkpointId/evaluation-requests';

  router.get(base, requireRole('viewer'), async (req, res) => {
    const run = await loadRun(ctx, req);
    const checkpoint = await loadCheckpoint(ctx, req, run);
    res.json((await jobs().forCheckpoint(checkpoint)).map(toEvaluationRequestDto));
  });

  router.post(base, requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    const checkpoint = await loadCheckpoint(ctx, req, run);
    const { settings } = parseBody(createEvaluationRequestSchema, req.body);
    const { bench } = currentBench(req);
    await checkBaselineRun(ctx.orm.em, bench, settings);
    const stored = await new EvaluationRepository(ctx.orm.em).findSame(checkpoint, settings);
    if (stored) {
      res.status(409).json(evaluationExistsBody(checkpoint.step, stored));
      return;
    }
    const pending = await jobs().pending(checkpoint, settings);
    if (pending) {
      res.status(200).json(toEvaluationRequestDto(pending));
      return;
    }
    const created = await jobs().create(bench, run, checkpoint, currentUser(req), settings);
    res.status(201).json(toEvaluationRequestDto(created));
  });

  return router;
}

/** Routes under /api/benches/:benchId/evaluation-requests. */
export function benchEvaluationRequestRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  router.get('/:requestId', requireRole('viewer'), async (req, res) => {
    const found = await new EvaluationJobService(ctx).find(currentBench(req).bench, String(req.params['requestId'] ?? ''));
    if (!found) throw notFound('This evaluation request');
    res.json(toEvaluationRequestDto(found));
  });
  router.delete('/:requestId', requireRole('member'), async (req, res) => {
    const jobs = new EvaluationJobService(ctx);
    const found = await jobs.find(currentBench(req).bench, String(req.params['requestId'] ?? ''));
    if (!found) throw notFound('This evaluation request');
    requireControl(req, found.run);
    await jobs.withdraw(found);
    res.status(204).end();
  });
  return router;
}
