/**
 * GET /api/benches/:benchId/corpora/:corpusId/training-set (viewer+): every word of a corpus with its
 * count and split, as parallel arrays (compact for the training worker). Added by the runs module,
 * which is its only user; mounted next to the corpora router (see server/modules/registry.ts).
 */
import { Router } from 'express';
import type { TrainingSet } from '../../../shared/api/runs';
import type { AppContext } from '../../app-context';
import { notFound } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { currentBench } from '../../request-state';
import { CorpusRepository } from './corpus.repository';
import { UUID } from '../../ids';

export function trainingSetRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  router.get('/:corpusId/training-set', requireRole('viewer'), async (req, res) => {
    const id = String(req.params['corpusId'] ?? '');
    const corpus = UUID.test(id) ? await new CorpusRepository(ctx.orm.em).find(currentBench(req).bench, id) : null;
    if (!corpus) throw notFound('This corpus');
    const body: TrainingSet = { alphabet: corpus.alphabet, ...(await new CorpusRepository(ctx.orm.em).trainingWords(corpus)) };
    res.json(body);
  });
  return router;
}
