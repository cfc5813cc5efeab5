/**
 * /api/runner/*: the routes runner programs (and the server's embedded runner threads) call, with a runner
 * token. Contract: shared/api/runner-jobs.ts and DEVELOPERS.md "Runners". A runner reads and writes only
 * the runs it holds (409 RUN_NOT_HELD otherwise) and only their corpus. `POST /claim` with `waitSeconds` waits for
 * work (claim-answer.ts `claimWaiting`) instead of answering 204 at once.
 */
import { Router } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import {
  runnerCheckpointQuerySchema,
  runnerClaimSchema,
  runnerFinishSchema,
  runnerHeartbeatSchema,
  runnerMetricsSchema,
  runnerProgressSchema,
} from '../../../shared/api/runner-jobs';
import { MAX_METRIC_POINTS_PER_REQUEST, type TrainingSet } from '../../../shared/api/runs';
import { splitOf } from '../../../shared/data/split';
import type { AppContext } from '../../app-context';
import { HttpError, notFound } from '../../http-error';
import { routineRequests } from '../../logging';
import { parseBody, parseQuery } from '../../middleware/validate';
import { CorpusRepository } from '../corpora/corpus.repository';
import { storeUploadedCheckpoint } from '../runs/checkpoint-store';
import { checkpointBytes, rawCheckpointBody } from '../runs/checkpoint-upload';
import { Checkpoint } from '../runs/checkpoint.entity';
import { MetricRepository } from '../runs/metric.repository';
import { corpusSplit } from '../runs/run-settings';
import { answerClaim, claimWaiting } from './claim-answer';
import { currentRunner, requireRunner } from './runner-auth';
import { RunnerJobService } from './runner-job.service';
import { runnerEvaluationRoutes } from '../evaluation-jobs/runner-evaluation.routes';

export function runnerJobRoutes(ctx: AppContext): Router {
  const router = Router();
  router.use(routineRequests);
  router.use(requireRunner(ctx));
  const jobs = () => new RunnerJobService(ctx);
  router.use('/evaluations', runnerEvaluationRoutes(ctx));

  router.post('/heartbeat', async (req, res) => {
    const body = parseBody(runnerHeartbeatSchema, req.body);
    res.json({ controls: await jobs().heartbeat(currentRunner(req), body) });
  });

  router.post('/claim', async (req, res) => {
    const { runId, waitSeconds } = parseBody(runnerClaimSchema, req.body);
    const runner = currentRunner(req);
    await answerClaim(res, () => claimWaiting(ctx, res, waitSeconds ?? 0, () => jobs().claim(runner, runId),
      (job) => jobs().finish(runner, job.runId, { status: 'queued', stepsDone: job.stepsDone })));
  });

  router.get('/jobs/:runId/training-set', async (req, res) => {
    const run = await jobs().held(currentRunner(req), String(req.params['runId']), true);
    const corpus = run.corpus;
    if (!corpus) throw notFound('The corpus of this run');
    const { words, counts, splits } = await new CorpusRepository(ctx.orm.em).trainingWords(corpus);
    const split = run.settings.split ?? corpusSplit(corpus);
    const own = JSON.stringify(split) === JSON.stringify(corpusSplit(corpus));
    const body: TrainingSet = { alphabet: run.alphabet, words, counts, splits: own ? splits : words.map((w) => splitOf(w, split.seed, split.shares)) };
    res.json(body);
  });

  router.get('/jobs/:runId/checkpoint', async (req, res) => {
    const run = await jobs().held(currentRunner(req), String(req.params['runId']));
    const latest = await ctx.orm.em.findOne(Checkpoint, { run }, { orderBy: { createdAt: 'desc', step: 'desc', id: 'asc' }, populate: ['bytes'] });
    if (!latest) throw notFound(`A checkpoint of "${run.name}"`);
    res.type('application/octet-stream');
    res.set('X-Checkpoint-Step', String(latest.step));
    res.set('Content-Length', String(latest.bytes.length));
    res.end(latest.bytes);
  });

  router.post('/jobs/:runId/progress', async (req, res) => {
    const body = parseBody(runnerProgressSchema, req.body);
    res.json({ action: await jobs().progress(currentRunner(req), String(req.params['runId']), body) });
  });

  router.post('/jobs/:runId/metrics', async (req, res) => {
    const run = await jobs().held(currentRunner(req), String(req.params['runId']));
    const points = (req.body as { points?: unknown } | undefined)?.points;
    if (Array.isArray(points) && points.length > MAX_METRIC_POINTS_PER_REQUEST) {
      throw new HttpError(413, ErrorCode.PayloadTooLarge, `This batch has ${points.length} points; send at most ${MAX_METRIC_POINTS_PER_REQUEST} per request.`);
    }
    const body = parseBody(runnerMetricsSchema, req.body);
    await new MetricRepository(ctx.orm.em).append(run, body.points);
    ctx.runEvents.publish({ name: 'metrics', benchId: run.bench.id, runId: run.id, data: { points: body.points } });
    res.status(201).json({ stored: body.points.length });
  });

  router.post('/jobs/:runId/checkpoints', rawCheckpointBody(ctx.config.maxCheckpointBytes), async (req, res) => {
    const run = await jobs().held(currentRunner(req), String(req.params['runId']));
    const query = parseQuery(runnerCheckpointQuerySchema, req.query);
    res.status(201).json(await storeUploadedCheckpoint(ctx, run, checkpointBytes(req), query));
  });

  router.post('/jobs/:runId/finish', async (req, res) => {
    const body = parseBody(runnerFinishSchema, req.body);
    await jobs().finish(currentRunner(req), String(req.params['runId']), body);
    res.json({ ok: true });
  });

  return router;
}
