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

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export function trainingSetRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  router.get('/:corpusId/training-set', requireRole('viewer'), async (req, res) => {
    const id = String(req.params['corpusId'] ?? '');
    const corpus = UUID.test(id) ? await new CorpusRepository(ctx.orm.em).find(currentBench(req).bench, id) : null;
    if (!corpus) throw notFound('This corpus');
    // The read connection: a tab starting a run does not wait for another upload's write transaction.
    const rows: { word: string; count: number; split: TrainingSet['splits'][number] }[] = await ctx.orm.em
      .getConnection('read')
      .execute('select word, `count`, split from corpus_words where corpus_id = ? order by `count` desc, word asc', [corpus.id]);
    const body: TrainingSet = {
      alphabet: corpus.alphabet,
      words: rows.map((r) => r.word),
      counts: rows.map((r) => Number(r.count)),
      splits: rows.map((r) => r.split),
    };
    res.json(body);
  });
  return router;
}
