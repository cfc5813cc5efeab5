/**
 * The data of a run, under /api/benches/:benchId/runs: metric points (batch append, compact read,
 * truncate after a step), checkpoints (binary upload checked against the run, list, download) and
 * import of a checkpoint file as a new run. Reads need viewer; writes need control of the run.
 */
import { Router } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import {
  MAX_METRIC_POINTS_PER_REQUEST,
  checkpointUploadQuerySchema,
  metricBatchSchema,
  metricsQuerySchema,
  truncateMetricsQuerySchema,
} from '../../../shared/api/runs';
import type { AppContext } from '../../app-context';
import { conflict, HttpError, notFound, validationFailed } from '../../http-error';
import { requireRole } from '../../middleware/bench-access';
import { parseBody, parseQuery } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { ActivityRepository } from '../activity/activity.repository';
import { Corpus } from '../corpora/corpus.entity';
import { readCheckpoint, runSettingsFromCheckpoint, unusable } from './checkpoint-check';
import { checkpointBytes, checkpointFileReader, rawCheckpointBody } from './checkpoint-upload';
import { checkCheckpointValues } from './checkpoint-value-checks';
import { storeUploadedCheckpoint } from './checkpoint-store';
import { unsafeTextProblem } from '../../../shared/api/safe-text';
import { CheckpointRepository, toCheckpointDto } from './checkpoint.repository';
import { MetricRepository } from './metric.repository';
import { loadRun, requireControl } from './run-access';
import type { Run } from './run.entity';
import { RunRepository } from './run.repository';
import { corpusSplit, FAMILY_LABELS } from './run-settings';
import { UUID } from '../../ids';

function refuseIfArchived(run: Run): void {
  if (run.archived) {
    throw conflict(ErrorCode.RunStatusConflict, `"${run.name}" is archived; restore it from the archive before you add data to it.`);
  }
}

/** A file name for a download: the run name reduced to safe characters, plus the step. */
export function checkpointFileName(runName: string, step: number): string {
  const base = runName.normalize('NFKD').replace(/[\u0300-\u036f]/g, '').replace(/[^\w.-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 60) || 'run';
  return `${base}-step-${step}.nwck`;
}

export function runDataRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  const readImport = checkpointFileReader(ctx.config.maxCheckpointBytes);

  router.post('/:runId/metrics', requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    refuseIfArchived(run);
    const points = (req.body as { points?: unknown } | undefined)?.points;
    if (Array.isArray(points) && points.length > MAX_METRIC_POINTS_PER_REQUEST) {
      throw new HttpError(
        413,
        ErrorCode.PayloadTooLarge,
        `This batch has ${points.length} points; send at most ${MAX_METRIC_POINTS_PER_REQUEST} per request (split it into several).`,
      );
    }
    const body = parseBody(metricBatchSchema, req.body);
    await new MetricRepository(ctx.orm.em).append(run, body.points);
    ctx.runEvents.publish({ name: 'metrics', benchId: run.bench.id, runId: run.id, data: { points: body.points } });
    res.status(201).json({ stored: body.points.length });
  });

  router.get('/:runId/metrics', requireRole('viewer'), async (req, res) => {
    const run = await loadRun(ctx, req);
    const query = parseQuery(metricsQuerySchema, req.query);
    res.json(await new MetricRepository(ctx.orm.em).read(run, query));
  });

  router.delete('/:runId/metrics', requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    refuseIfArchived(run);
    const { afterStep } = parseQuery(truncateMetricsQuerySchema, req.query);
    res.json({ removed: await new MetricRepository(ctx.orm.em).truncateAfter(run, afterStep) });
  });

  router.post('/:runId/checkpoints', requireRole('member'), rawCheckpointBody(ctx.config.maxCheckpointBytes), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    refuseIfArchived(run);
    const query = parseQuery(checkpointUploadQuerySchema, req.query);
    res.status(201).json(await storeUploadedCheckpoint(ctx, run, checkpointBytes(req), query));
  });

  router.get('/:runId/checkpoints', requireRole('viewer'), async (req, res) => {
    const run = await loadRun(ctx, req);
    res.json((await new CheckpointRepository(ctx.orm.em).list(run)).map(toCheckpointDto));
  });

  router.get('/:runId/checkpoints/:checkpointId/file', requireRole('viewer'), async (req, res) => {
    const run = await loadRun(ctx, req);
    const id = String(req.params['checkpointId'] ?? '');
    const checkpoint = UUID.test(id) ? await new CheckpointRepository(ctx.orm.em).findWithBytes(run, id) : null;
    if (!checkpoint) throw notFound('This checkpoint');
    res.attachment(checkpointFileName(run.name, checkpoint.step));
    res.type('application/octet-stream');
    res.set('Content-Length', String(checkpoint.bytes.length));
    res.end(checkpoint.bytes);
  });

  router.post('/import', requireRole('member'), async (req, res) => {
    const upload = await readImport(req, res);
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    const em = ctx.orm.em;
    const found = readCheckpoint(upload.bytes);
    checkCheckpointValues(found.checkpoint);
    const ck = found.checkpoint;
    const corpusId = typeof upload.fields['corpusId'] === 'string' ? upload.fields['corpusId'].trim() : '';
    let corpus: Corpus | null = null;
    if (corpusId !== '') {
      corpus = UUID.test(corpusId) ? await em.findOne(Corpus, { id: corpusId, bench }) : null;
      if (!corpus) throw validationFailed({ corpusId: 'Choose a corpus of this bench, or leave the corpus out.' });
      if (corpus.alphabet.join('\u0000') !== ck.alphabet.join('\u0000')) {
        throw unusable(
          `The checkpoint was trained on ${ck.alphabet.length} characters that differ from the corpus "${corpus.name}" ` +
            `(${corpus.alphabet.length} characters); choose the corpus it was trained on, or import it without a corpus.`,
        );
      }
    }
    const rawName = typeof upload.fields['name'] === 'string' ? upload.fields['name'].trim() : '';
    const nameProblem = unsafeTextProblem(rawName) ?? unsafeTextProblem(upload.fileName);
    if (nameProblem) throw validationFailed({ name: nameProblem });
    const name = (rawName || upload.fileName.replace(/\.nwck$/i, '').trim() || `Imported ${FAMILY_LABELS[ck.family]}`).slice(0, 120);
    const now = ctx.clock.now();
    const run = new RunRepository(em).create({
      bench,
      corpus,
      createdBy: me,
      name,
      family: ck.family,
      settings: runSettingsFromCheckpoint(found, corpus ? corpusSplit(corpus) : undefined),
      alphabet: ck.alphabet.slice(),
      status: 'stopped',
      stepsDone: ck.step,
      at: now,
    });
    run.statusReason = 'Imported from a checkpoint file; resume it to train further.';
    new CheckpointRepository(em).create({ run, step: ck.step, boundBitsPerChar: null, reason: 'import', formatVersion: ck.formatVersion, bytes: upload.bytes, at: now });
    new ActivityRepository(em).record(
      bench,
      me,
      'run.imported',
      `${me.displayName} imported the run "${name}" (${FAMILY_LABELS[ck.family]}, step ${ck.step}) from a checkpoint file.`,
      now,
    );
    await em.flush();
    res.status(201).json(await new RunRepository(em).dto(run, me, role));
  });

  return router;
}
