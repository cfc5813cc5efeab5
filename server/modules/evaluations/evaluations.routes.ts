/**
 * Stored evaluations. Under a checkpoint (mounted at /api/benches/:benchId/runs):
 * `/:runId/checkpoints/:checkpointId/evaluations` GET list, POST store, `/:evaluationId` GET one. Bench-wide
 * (mounted at /api/benches/:benchId/evaluations): GET list, GET one. Viewers read; members store evaluations
 * of their own runs, coaches and owners of every run. The figures are computed in the browser (or by
 * `npm run evaluate`) and checked here for shape and finiteness; the same settings twice is a 409 that
 * returns the stored evaluation, so a page never computes the same figures again.
 */
import { Router, type Request } from 'express';
import { createEvaluationSchema, listEvaluationsQuerySchema, type EvaluationResults } from '../../../shared/api/evaluations';
import type { AppContext } from '../../app-context';
import { notFound } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { parseBody, parseQuery } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { Checkpoint } from '../runs/checkpoint.entity';
import { loadRun, requireControl } from '../runs/run-access';
import type { Run } from '../runs/run.entity';
import { evaluationExistsBody, storeEvaluation } from './evaluation-store';
import { EvaluationRepository, toEvaluationDto, toEvaluationSummary } from './evaluation.repository';
import { UUID } from '../../ids';

export async function loadCheckpoint(ctx: AppContext, req: Request, run: Run): Promise<Checkpoint> {
  const id = String(req.params['checkpointId'] ?? '');
  const checkpoint = UUID.test(id) ? await ctx.orm.em.findOne(Checkpoint, { id, run }) : null;
  if (!checkpoint) throw notFound('This checkpoint');
  return checkpoint;
}

/** Routes under /api/benches/:benchId/runs. */
export function checkpointEvaluationRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  const evaluations = () => new EvaluationRepository(ctx.orm.em);
  const base = '/:runId/checkpoints/:checkpointId/evaluations';

  router.get(base, requireRole('viewer'), async (req, res) => {
    const run = await loadRun(ctx, req);
    const checkpoint = await loadCheckpoint(ctx, req, run);
    res.json((await evaluations().forCheckpoint(checkpoint)).map(toEvaluationSummary));
  });

  router.get(`${base}/:evaluationId`, requireRole('viewer'), async (req, res) => {
    const run = await loadRun(ctx, req);
    const checkpoint = await loadCheckpoint(ctx, req, run);
    const id = String(req.params['evaluationId'] ?? '');
    const found = UUID.test(id) ? await evaluations().find(currentBench(req).bench, id, checkpoint) : null;
    if (!found) throw notFound('This evaluation');
    res.json(toEvaluationDto(found));
  });

  router.post(base, requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    const checkpoint = await loadCheckpoint(ctx, req, run);
    const body = parseBody(createEvaluationSchema, req.body);
    const { bench } = currentBench(req);
    const stored = await storeEvaluation(ctx.orm.em, {
      bench, run, checkpoint, by: currentUser(req), settings: body.settings, results: body.results as EvaluationResults, at: ctx.clock.now(),
    });
    const evaluation = stored.evaluation;
    if (stored.existing) {
      res.status(409).json(evaluationExistsBody(checkpoint.step, evaluation));
      return;
    }
    res.status(201).json(toEvaluationDto(evaluation));
  });

  return router;
}

/** Routes under /api/benches/:benchId/evaluations. */
export function benchEvaluationRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  const evaluations = () => new EvaluationRepository(ctx.orm.em);

  router.get('/', requireRole('viewer'), async (req, res) => {
    const query = parseQuery(listEvaluationsQuerySchema, req.query);
    res.json(await evaluations().page(currentBench(req).bench, query));
  });

  router.get('/:evaluationId', requireRole('viewer'), async (req, res) => {
    const id = String(req.params['evaluationId'] ?? '');
    const found = UUID.test(id) ? await evaluations().find(currentBench(req).bench, id) : null;
    if (!found) throw notFound('This evaluation');
    res.json(toEvaluationDto(found));
  });

  return router;
}
