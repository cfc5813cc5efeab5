/**
 * Runs of a bench, mounted at /api/benches/:benchId/runs behind the bench loader: list (filter, sort,
 * page), create, read, change status / figures / name (PATCH), archive and delete. The rules (status
 * machine, activity log, placement on runners) live in run.service.ts. Metric points, checkpoints and
 * import live in run-data.routes.ts and are mounted on the same router. Viewers read; members create and
 * control their own runs; coaches and owners control every run.
 */
import { Router } from 'express';
import { archiveRunSchema, createRunSchema, listRunsQuerySchema, updateRunSchema, type RunSettings } from '../../../shared/api/runs';
import type { AppContext } from '../../app-context';
import { requireRole } from '../../middleware/bench-access';
import { parseBody, parseQuery } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import './run-corpus-usage';
import { loadRun, requireControl } from './run-access';
import { runDataRoutes } from './run-data.routes';
import { RunRepository } from './run.repository';
import { RunService } from './run.service';

export function runRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  const runs = () => new RunRepository(ctx.orm.em);
  const service = () => new RunService(ctx);

  router.get('/', requireRole('viewer'), async (req, res) => {
    const query = parseQuery(listRunsQuerySchema, req.query);
    const { bench, role } = currentBench(req);
    res.json(await runs().page(bench, query, currentUser(req), role));
  });

  router.post('/', requireRole('member'), async (req, res) => {
    const body = parseBody(createRunSchema, req.body);
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    const run = await service().create({
      bench, me, corpusId: body.corpusId, name: body.name, family: body.family, settings: body.settings as RunSettings, placement: body.placement,
    });
    res.status(201).json(await runs().dto(run, me, role));
  });

  router.get('/:runId', requireRole('viewer'), async (req, res) => {
    const run = await loadRun(ctx, req);
    res.json(await runs().dto(run, currentUser(req), currentBench(req).role));
  });

  router.patch('/:runId', requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    const body = parseBody(updateRunSchema, req.body);
    const me = currentUser(req);
    const change = await service().update(run, body, me);
    const dto = await runs().dto(change.run, me, currentBench(req).role);
    res.json(change.message ? { ...dto, message: change.message } : dto);
  });

  router.post('/:runId/archive', requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    const { archived } = parseBody(archiveRunSchema, req.body);
    const me = currentUser(req);
    await service().archive(run, archived, me);
    res.json(await runs().dto(run, me, currentBench(req).role));
  });

  router.delete('/:runId', requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    await service().remove(run, currentUser(req));
    res.status(204).end();
  });

  router.use('/', runDataRoutes(ctx));
  return router;
}
