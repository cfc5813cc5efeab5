/**
 * Grids of runs, mounted at /api/benches/:benchId/grids: create (one queued run per cell, one transaction),
 * list, read (cells with their runs' status and figures), the verdict of a learnability check, delete.
 * The learnability check itself is started at /corpora/:corpusId/learnability (learnability.routes.ts).
 * Viewers read; members start grids; the creator, coaches and owners delete them.
 */
import { Router, type Request } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import { createGridSchema, deleteGridQuerySchema } from '../../../shared/api/grids';
import { ACTIVE_RUN_STATUSES } from '../../../shared/api/runs';
import type { AppContext } from '../../app-context';
import { conflict, notFound, roleTooLow, validationFailed } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { parseBody, parseQuery } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { ActivityRepository } from '../activity/activity.repository';
import { Corpus } from '../corpora/corpus.entity';
import { Run } from '../runs/run.entity';
import { corpusSplit } from '../runs/run-settings';
import { planGrid } from './grid-cells';
import { checkCorpusForRuns, createGridWithRuns } from './grid-create';
import { Grid } from './grid.entity';
import { canDeleteGrid, GridRepository } from './grid.repository';
import { verdictOfGrid } from './learnability';
import { UUID } from '../../ids';

async function loadGrid(ctx: AppContext, req: Request): Promise<Grid> {
  const id = String(req.params['gridId'] ?? '');
  const grid = UUID.test(id) ? await new GridRepository(ctx.orm.em).find(currentBench(req).bench, id) : null;
  if (!grid) throw notFound('This grid');
  return grid;
}

export function gridRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  const grids = () => new GridRepository(ctx.orm.em);

  router.get('/', requireRole('viewer'), async (req, res) => {
    const kind = req.query['kind'];
    if (kind !== undefined && kind !== 'grid' && kind !== 'learnability') throw validationFailed({ kind: 'Give kind as grid or learnability.' });
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    const list = await grids().list(bench, kind);
    const out = [];
    for (const g of list) out.push(grids().summary(g, await grids().runsOf(g), me, role));
    res.json(out);
  });

  router.post('/', requireRole('member'), async (req, res) => {
    const body = parseBody(createGridSchema, req.body);
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    const corpus = await ctx.orm.em.findOne(Corpus, { id: body.corpusId, bench });
    if (!corpus) throw validationFailed({ corpusId: 'Choose a corpus of this bench; this one does not exist here (it may have been deleted).' });
    const plan = planGrid(body.family, body.baseSettings, body.axes, corpusSplit(corpus));
    if (!plan.ok) throw validationFailed(plan.fields, `Some cells of the grid have settings a run cannot take: ${Object.values(plan.fields)[0]}`);
    await checkCorpusForRuns(ctx, corpus, plan.cells[0]!.settings.split!, 'corpusId');
    const grid = await createGridWithRuns(ctx, {
      bench, corpus, me, name: body.name, kind: 'grid', family: body.family, axes: body.axes, baseSettings: body.baseSettings,
      figure: body.figure, budgetSteps: null, runs: plan.cells.map((c) => ({ coords: c.coords, label: c.label, family: body.family, settings: c.settings })),
      placement: body.placement,
    });
    res.status(201).json(grids().dto(grid, await grids().runsOf(grid), me, role));
  });

  router.get('/:gridId', requireRole('viewer'), async (req, res) => {
    const grid = await loadGrid(ctx, req);
    res.json(grids().dto(grid, await grids().runsOf(grid), currentUser(req), currentBench(req).role));
  });

  router.get('/:gridId/verdict', requireRole('viewer'), async (req, res) => {
    const grid = await loadGrid(ctx, req);
    if (grid.kind !== 'learnability') throw validationFailed({ gridId: 'Only a learnability check has a verdict; this is a plain grid.' });
    const runs = await grids().runsOf(grid);
    const dto = grids().dto(grid, runs, currentUser(req), currentBench(req).role);
    res.json(verdictOfGrid(grid.id, grid.budgetSteps, dto.cells, runs));
  });

  router.delete('/:gridId', requireRole('member'), async (req, res) => {
    const grid = await loadGrid(ctx, req);
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    if (!canDeleteGrid(grid, me, role)) throw roleTooLow(`Only the person who started "${grid.name}", a coach or an owner may delete it; ask one of them.`);
    const { runs: what } = parseQuery(deleteGridQuerySchema, req.query);
    const runs = await grids().runsOf(grid);
    const training = runs.filter((r) => r.status === 'training');
    if (training.length > 0) {
      throw conflict(ErrorCode.RunStatusConflict,
        `${training.length} run${training.length === 1 ? ' is' : 's are'} of "${grid.name}" still training (e.g. "${training[0]!.name}"); pause or stop ${training.length === 1 ? 'it' : 'them'} first.`);
    }
    const now = ctx.clock.now();
    await ctx.orm.em.transactional(async (em) => {
      await em.nativeUpdate(Run, { grid: grid.id, status: { $in: [...ACTIVE_RUN_STATUSES] } },
        { status: 'stopped', statusReason: `Its grid "${grid.name}" was deleted.`, updatedAt: now });
      if (what === 'delete') await em.nativeDelete(Run, { grid: grid.id });
      else await em.nativeUpdate(Run, { grid: grid.id }, { gridCell: null, ...(what === 'archive' ? { archived: true } : {}) });
      // runs.grid_id becomes null with the grid (ON DELETE SET NULL).
      await em.nativeDelete(Grid, { id: grid.id });
      const fate = what === 'delete' ? 'deleted its runs' : what === 'archive' ? 'archived its runs' : 'kept its runs';
      new ActivityRepository(em).record(bench, me, 'grid.deleted', `${me.displayName} deleted the grid "${grid.name}" and ${fate}.`, now);
    });
    const uow = ctx.orm.em.getUnitOfWork();
    for (const run of runs) uow.unsetIdentity(run);
    uow.unsetIdentity(grid);
    res.status(204).end();
  });

  return router;
}
