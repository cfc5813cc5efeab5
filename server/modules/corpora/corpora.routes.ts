/**
 * Corpora of a bench, mounted at /api/benches/:benchId/corpora behind the bench loader:
 * list, preview (stores nothing), save, read, words (sort/filter/page), export as TSV, rename/describe,
 * delete. Viewers read; members upload; the uploader, coaches and owners rename and delete.
 */
import { Router, type Request } from 'express';
import type { CorpusInvalidBody } from '../../../shared/api/corpora';
import { saveCorpusFieldsSchema, updateCorpusSchema, wordQuerySchema } from '../../../shared/api/corpora';
import { ErrorCode } from '../../../shared/api/errors';
import type { AppContext } from '../../app-context';
import { conflict, notFound, roleTooLow } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { parseBody, parseQuery } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { ActivityRepository } from '../activity/activity.repository';
import { currentRequestSignal } from '../../middleware/client-gone';
import { cpuPool } from '../../workers/cpu-pool';
import { savableFromPool } from './corpus-pool-result';
import { uploadReader } from './corpus-upload';
import { deleteDecision, runsUsingCorpus } from './corpus-usage';
import { CorpusRepository, canEditCorpus, toCorpusDetail, toCorpusSummary } from './corpus.repository';
import { UUID } from '../../ids';

export function corporaRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  const readUpload = uploadReader(ctx.config.maxUploadBytes, ctx.config.uploadTempDir);
  const repo = () => new CorpusRepository(ctx.orm.em);

  async function loadCorpus(req: Request) {
    const id = String(req.params['corpusId'] ?? '');
    if (!UUID.test(id)) throw notFound('This corpus');
    const corpus = await repo().find(currentBench(req).bench, id);
    if (!corpus) throw notFound('This corpus');
    return corpus;
  }

  function requireEditor(req: Request, corpus: Parameters<typeof canEditCorpus>[0]): void {
    const { role } = currentBench(req);
    if (!canEditCorpus(corpus, currentUser(req), role)) {
      throw roleTooLow(`Only the person who uploaded "${corpus.name}", a coach or an owner may change or delete it.`);
    }
  }

  router.get('/', requireRole('viewer'), async (req, res) => {
    const { bench, role } = currentBench(req);
    const user = currentUser(req);
    const corpora = await repo().list(bench);
    res.json(corpora.map((c) => toCorpusSummary(c, canEditCorpus(c, user, role))));
  });

  router.post('/preview', requireRole('member'), async (req, res) => {
    const upload = await readUpload(req, res);
    const analysed = await upload.whileStored((path) => cpuPool.analyse({ path, size: upload.size }, upload.fileName, upload.options, false));
    res.json(analysed.preview);
  });

  router.post('/', requireRole('member'), async (req, res) => {
    const upload = await readUpload(req, res);
    // Parsing and analysis run in a worker thread that reads the stored file as a stream (server/workers/cpu-pool.ts);
    // the event loop stays free, and the file is removed as soon as it is read.
    const [fields, analysed] = await upload.whileStored(async (path) => {
      const fields = parseBody(saveCorpusFieldsSchema, { name: upload.fields['name'], description: upload.fields['description'] ?? '' });
      return [fields, await cpuPool.analyse({ path, size: upload.size }, upload.fileName, upload.options, true)] as const;
    });
    const preview = analysed.preview;
    if (!preview.ok) {
      const first = preview.problems.find((p) => p.severity === 'error');
      const n = preview.errorCount;
      const body: CorpusInvalidBody = {
        error: {
          code: ErrorCode.CorpusInvalid as 'CORPUS_INVALID',
          message: `Nothing was saved: the file has ${n === 1 ? '1 error' : `${n} errors`}. ${first?.message ?? ''} Fix ${n === 1 ? 'it' : 'them'} and upload the file again.`.replace(/\s+/g, ' '),
          problems: preview.problems,
          errorCount: n,
        },
      };
      res.status(422).json(body);
      return;
    }
    const { bench, role } = currentBench(req);
    const user = currentUser(req);
    const corpus = await repo().save({ bench, user, name: fields.name, description: fields.description, upload: savableFromPool(upload.fileName, analysed), at: ctx.clock.now(), signal: currentRequestSignal() });
    res.status(201).json(toCorpusDetail(corpus, canEditCorpus(corpus, user, role), preview.splitCounts));
  });

  router.get('/:corpusId', requireRole('viewer'), async (req, res) => {
    const corpus = await loadCorpus(req);
    const { role } = currentBench(req);
    res.json(toCorpusDetail(corpus, canEditCorpus(corpus, currentUser(req), role), await repo().splitCounts(corpus)));
  });

  router.get('/:corpusId/words', requireRole('viewer'), async (req, res) => {
    const corpus = await loadCorpus(req);
    res.json(await repo().words(corpus, parseQuery(wordQuerySchema, req.query)));
  });

  router.get('/:corpusId/export.tsv', requireRole('viewer'), async (req, res) => {
    const corpus = await loadCorpus(req);
    const words = await repo().allWords(corpus);
    const base = corpus.name.replace(/[^\p{L}\p{N}._-]+/gu, '-').replace(/^-+|-+$/g, '') || 'corpus';
    res.type('text/tab-separated-values; charset=utf-8');
    res.set('Content-Disposition', `attachment; filename="${base.replace(/[^\x20-\x7e]/g, '_')}.tsv"; filename*=UTF-8''${encodeURIComponent(base)}.tsv`);
    res.send(`word\tcount\n${words.map((w) => `${w.word}\t${w.count}`).join('\n')}\n`);
  });

  router.patch('/:corpusId', requireRole('member'), async (req, res) => {
    const corpus = await loadCorpus(req);
    requireEditor(req, corpus);
    const body = parseBody(updateCorpusSchema, req.body);
    const { bench, role } = currentBench(req);
    const user = currentUser(req);
    const changes: string[] = [];
    if (body.name !== undefined && body.name !== corpus.name) {
      changes.push(`renamed the corpus "${corpus.name}" to "${body.name}"`);
      corpus.name = body.name;
    }
    if (body.description !== undefined && body.description !== corpus.description) {
      changes.push(`changed the description of "${corpus.name}"`);
      corpus.description = body.description;
    }
    if (changes.length > 0) {
      corpus.updatedAt = ctx.clock.now();
      new ActivityRepository(ctx.orm.em).record(bench, user, 'corpus.updated', `${user.displayName} ${changes.join(' and ')}.`, ctx.clock.now());
      await ctx.orm.em.flush();
    }
    res.json(toCorpusDetail(corpus, canEditCorpus(corpus, user, role), await repo().splitCounts(corpus)));
  });

  router.delete('/:corpusId', requireRole('member'), async (req, res) => {
    const corpus = await loadCorpus(req);
    requireEditor(req, corpus);
    const confirmed = req.query['confirmArchivedRuns'] === 'true';
    const decision = deleteDecision(await runsUsingCorpus(ctx.orm.em, corpus.id), confirmed);
    if (!decision.allowed) throw conflict(ErrorCode.CorpusInUse, decision.message);
    const { bench } = currentBench(req);
    const user = currentUser(req);
    await ctx.orm.em.transactional(async (em) => {
      await new CorpusRepository(em).delete(corpus);
      new ActivityRepository(em).record(bench, user, 'corpus.deleted', `${user.displayName} deleted the corpus "${corpus.name}".`, ctx.clock.now());
    });
    res.status(204).end();
  });

  return router;
}
