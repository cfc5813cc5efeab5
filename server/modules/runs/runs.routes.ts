/**
 * Runs of a bench, mounted at /api/benches/:benchId/runs behind the bench loader: list (filter, sort,
 * page), create, read, change status / figures / name (PATCH, with the status machine of
 * shared/api/runs.ts), archive and delete. Metric points, checkpoints and import live in
 * run-data.routes.ts and are mounted on the same router. Viewers read; members create and control
 * their own runs; coaches and owners control every run.
 */
import { Router } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import {
  ACTIVE_RUN_STATUSES,
  RUN_TRANSITIONS,
  archiveRunSchema,
  canMoveRun,
  createRunSchema,
  listRunsQuerySchema,
  updateRunSchema,
  type RunSettings,
  type RunStatus,
} from '../../../shared/api/runs';
import type { AppContext } from '../../app-context';
import { conflict, validationFailed } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { parseBody, parseQuery } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { ActivityRepository } from '../activity/activity.repository';
import { Corpus } from '../corpora/corpus.entity';
import './run-corpus-usage';
import { loadRun, requireControl } from './run-access';
import { runDataRoutes } from './run-data.routes';
import { Run } from './run.entity';
import { RunRepository } from './run.repository';
import { corpusSplit, FAMILY_LABELS } from './run-settings';

function transitionRefusal(from: RunStatus, to: RunStatus): string {
  const allowed = RUN_TRANSITIONS[from];
  const hint =
    from === 'queued' && to === 'paused'
      ? 'it has not started yet; start it or stop it instead.'
      : to === 'finished' && from !== 'training'
        ? 'only a run that is training can finish.'
        : to === 'paused'
          ? 'only a run that is training can be paused.'
          : `from ${from} it can become ${allowed.join(', ')}.`;
  return `A run that is ${from} cannot become ${to}: ${hint}`;
}

export function runRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  const runs = () => new RunRepository(ctx.orm.em);

  router.get('/', requireRole('viewer'), async (req, res) => {
    const query = parseQuery(listRunsQuerySchema, req.query);
    const { bench, role } = currentBench(req);
    res.json(await runs().page(bench, query, currentUser(req), role));
  });

  router.post('/', requireRole('member'), async (req, res) => {
    const body = parseBody(createRunSchema, req.body);
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    const em = ctx.orm.em;
    const corpus = await em.findOne(Corpus, { id: body.corpusId, bench });
    if (!corpus) throw validationFailed({ corpusId: 'Choose a corpus of this bench; this one does not exist here (it may have been deleted).' });
    if (corpus.alphabet.length + 1 > 4096) {
      throw validationFailed({ corpusId: `This corpus has ${corpus.alphabet.length} different characters; models take at most 4095. Restrict its alphabet first.` });
    }
    const settings = { ...body.settings, split: body.settings.split ?? corpusSplit(corpus) } as RunSettings;
    const ownSplit = JSON.stringify(settings.split) === JSON.stringify(corpusSplit(corpus));
    if (!(await runs().hasTrainingWords(corpus, settings.split!, ownSplit))) {
      throw validationFailed(
        { [body.settings.split ? 'settings.split.shares' : 'corpusId']: 'No word of this corpus falls in the training split; raise the train share or choose another split seed.' },
      );
    }
    const now = ctx.clock.now();
    const run = runs().create({
      bench,
      corpus,
      createdBy: me,
      name: body.name,
      family: body.family,
      settings,
      alphabet: corpus.alphabet.slice(),
      status: 'queued',
      at: now,
    });
    new ActivityRepository(em).record(
      bench,
      me,
      'run.created',
      `${me.displayName} created the run "${run.name}" (${FAMILY_LABELS[run.family]}) on the corpus "${corpus.name}".`,
      now,
    );
    await em.flush();
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
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    const changesProgress = body.status !== undefined || body.summary !== undefined || body.stepsDone !== undefined;
    if (run.archived && changesProgress) {
      throw conflict(ErrorCode.RunStatusConflict, `"${run.name}" is archived; restore it from the archive before you train it or change its figures.`);
    }
    if (body.status !== undefined && !canMoveRun(run.status, body.status)) {
      throw conflict(ErrorCode.RunStatusConflict, transitionRefusal(run.status, body.status));
    }
    const now = ctx.clock.now();
    const activity = new ActivityRepository(ctx.orm.em);
    if (body.name !== undefined && body.name !== run.name) {
      activity.record(bench, me, 'run.renamed', `${me.displayName} renamed the run "${run.name}" to "${body.name}".`, now);
      run.name = body.name;
    }
    if (body.status !== undefined) {
      const moved = body.status !== run.status;
      if (moved || body.statusReason !== undefined) run.statusReason = body.statusReason?.trim() || null;
      if (moved && (body.status === 'finished' || body.status === 'stopped' || body.status === 'failed')) {
        const why = body.status === 'failed' && run.statusReason ? ` ${run.statusReason}` : '';
        activity.record(bench, me, `run.${body.status}`, `The run "${run.name}" ${body.status === 'failed' ? 'failed' : `was ${body.status}`} at step ${body.stepsDone ?? run.stepsDone}.${why}`, now);
      }
      run.status = body.status;
    } else if (body.statusReason !== undefined) {
      run.statusReason = body.statusReason?.trim() || null;
    }
    if (body.stepsDone !== undefined) run.stepsDone = body.stepsDone;
    if (body.summary !== undefined) {
      run.summary = { ...run.summary, ...body.summary };
      run.bestBoundBitsPerChar = run.summary.bestValidationBitsPerChar ?? null;
    }
    run.updatedAt = now;
    await ctx.orm.em.flush();
    res.json(await runs().dto(run, me, role));
  });

  router.post('/:runId/archive', requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    const { archived } = parseBody(archiveRunSchema, req.body);
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    if (archived && ACTIVE_RUN_STATUSES.includes(run.status)) {
      throw conflict(ErrorCode.RunStatusConflict, `"${run.name}" is ${run.status}; stop it before you archive it.`);
    }
    if (archived !== run.archived) {
      const now = ctx.clock.now();
      run.archived = archived;
      run.updatedAt = now;
      new ActivityRepository(ctx.orm.em).record(
        bench,
        me,
        archived ? 'run.archived' : 'run.restored',
        `${me.displayName} ${archived ? 'archived' : 'restored from the archive'} the run "${run.name}".`,
        now,
      );
      await ctx.orm.em.flush();
    }
    res.json(await runs().dto(run, me, role));
  });

  router.delete('/:runId', requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    if (ACTIVE_RUN_STATUSES.includes(run.status)) {
      throw conflict(ErrorCode.RunStatusConflict, `"${run.name}" is ${run.status}; stop it before you delete it.`);
    }
    const { bench } = currentBench(req);
    const me = currentUser(req);
    await ctx.orm.em.transactional(async (em) => {
      // The database removes the run's metric points and checkpoints with it (ON DELETE CASCADE).
      await em.nativeDelete(Run, { id: run.id });
      new ActivityRepository(em).record(bench, me, 'run.deleted', `${me.displayName} deleted the run "${run.name}".`, ctx.clock.now());
    });
    ctx.orm.em.getUnitOfWork().unsetIdentity(run);
    res.status(204).end();
  });

  router.use('/', runDataRoutes(ctx));
  return router;
}
