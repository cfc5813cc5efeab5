/**
 * `POST /api/benches/:benchId/corpora/:corpusId/learnability` (member+): starts a learnability check, a grid
 * of kind `learnability` whose eleven runs share one training budget. Its verdict: GET /grids/:gridId/verdict.
 */
import { Router } from 'express';
import { learnabilityRequestSchema } from '../../../shared/api/grids';
import type { AppContext } from '../../app-context';
import { notFound } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { parseBody } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { Corpus } from '../corpora/corpus.entity';
import { corpusSplit } from '../runs/run-settings';
import { checkCorpusForRuns, createGridWithRuns } from './grid-create';
import { GridRepository } from './grid.repository';
import { learnabilityCells } from './learnability';
import { UUID } from '../../ids';

export function learnabilityRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });

  router.post('/:corpusId/learnability', requireRole('member'), async (req, res) => {
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    const id = String(req.params['corpusId'] ?? '');
    const corpus = UUID.test(id) ? await ctx.orm.em.findOne(Corpus, { id, bench }) : null;
    if (!corpus) throw notFound('This corpus');
    const body = parseBody(learnabilityRequestSchema, req.body);
    const split = corpusSplit(corpus);
    await checkCorpusForRuns(ctx, corpus, split, 'corpusId');
    const cells = learnabilityCells(body.budgetSteps, body.seed, split);
    const grid = await createGridWithRuns(ctx, {
      bench, corpus, me, name: body.name ?? `Learnability of ${corpus.name}`.slice(0, 120), kind: 'learnability', family: null,
      axes: [{ key: 'model', values: cells.map((c) => c.model) }],
      baseSettings: { budgetSteps: body.budgetSteps, seed: body.seed }, figure: 'bestValidationBitsPerChar', budgetSteps: body.budgetSteps,
      runs: cells.map((c, i) => ({ coords: [i], label: c.model, family: c.family, settings: c.settings })),
      placement: body.placement,
    });
    const repo = new GridRepository(ctx.orm.em);
    res.status(201).json(repo.dto(grid, await repo.runsOf(grid), me, role));
  });

  return router;
}
