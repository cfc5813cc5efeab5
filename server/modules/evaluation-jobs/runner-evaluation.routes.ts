/**
 * /api/runner/evaluations/*: evaluation requests for runners (mounted inside the runner routes, behind the same
 * runner-token guard). `POST /claim`, and for the request the runner holds only (409 RUN_NOT_HELD otherwise):
 * `GET /:id/checkpoint` (the checkpoint's bytes), `GET /:id/training-set` (the run's corpus as the tab gets it),
 * `GET /:id/baseline-checkpoint` (the newest checkpoint of the GRU baseline run, 404 when it has none),
 * `POST /:id/progress`, `POST /:id/result`, `POST /:id/end`. Contract: shared/api/evaluation-jobs.ts.
 */
import { Router, type Response } from 'express';
import {
  runnerEvaluationClaimSchema, runnerEvaluationEndSchema, runnerEvaluationProgressSchema, runnerEvaluationResultSchema, type RunnerEvaluationResultAnswer,
} from '../../../shared/api/evaluation-jobs';
import type { EvaluationResults } from '../../../shared/api/evaluations';
import type { TrainingSet } from '../../../shared/api/runs';
import type { AppContext } from '../../app-context';
import { notFound } from '../../http-error';
import { parseBody } from '../../middleware/validate';
import { CorpusRepository } from '../corpora/corpus.repository';
import { Checkpoint } from '../runs/checkpoint.entity';
import { Run } from '../runs/run.entity';
import { answerClaim } from '../runners/claim-answer';
import { currentRunner } from '../runners/runner-auth';
import { EvaluationJobService } from './evaluation-job.service';

function sendBytes(res: Response, checkpoint: Checkpoint): void {
  res.type('application/octet-stream');
  res.set('X-Checkpoint-Step', String(checkpoint.step));
  res.set('Content-Length', String(checkpoint.bytes.length));
  res.end(checkpoint.bytes);
}

export function runnerEvaluationRoutes(ctx: AppContext): Router {
  const router = Router();
  const jobs = () => new EvaluationJobService(ctx);
  const held = (req: { params: Record<string, string | undefined> }, runner: ReturnType<typeof currentRunner>) => jobs().held(runner, String(req.params['requestId'] ?? ''));

  router.post('/claim', async (req, res) => {
    const { requestId } = parseBody(runnerEvaluationClaimSchema, req.body);
    await answerClaim(res, () => jobs().claim(currentRunner(req), requestId));
  });

  router.get('/:requestId/checkpoint', async (req, res) => {
    const request = await held(req, currentRunner(req));
    const checkpoint = request.checkpoint ? await ctx.orm.em.findOne(Checkpoint, { id: request.checkpoint.id }, { populate: ['bytes'] }) : null;
    if (!checkpoint) throw notFound(`The checkpoint at step ${request.checkpointStep}`);
    sendBytes(res, checkpoint);
  });

  router.get('/:requestId/training-set', async (req, res) => {
    const request = await held(req, currentRunner(req));
    const corpus = request.run.corpus;
    if (!corpus) throw notFound('The corpus of this run');
    const body: TrainingSet = { alphabet: corpus.alphabet, ...(await new CorpusRepository(ctx.orm.em).trainingWords(corpus)) };
    res.json(body);
  });

  router.get('/:requestId/baseline-checkpoint', async (req, res) => {
    const request = await held(req, currentRunner(req));
    const baselineId = request.settings.baselineRunId;
    const baseline = baselineId ? await ctx.orm.em.findOne(Run, { id: baselineId, bench: request.bench }) : null;
    if (!baseline) throw notFound('The baseline run of this evaluation');
    const newest = await ctx.orm.em.findOne(Checkpoint, { run: baseline }, { orderBy: { step: 'desc', createdAt: 'desc', id: 'asc' }, populate: ['bytes'] });
    if (!newest) throw notFound(`A checkpoint of the baseline run "${baseline.name}"`);
    sendBytes(res, newest);
  });

  router.post('/:requestId/progress', async (req, res) => {
    const body = parseBody(runnerEvaluationProgressSchema, req.body);
    await jobs().progress(currentRunner(req), String(req.params['requestId']), body);
    res.json({ ok: true });
  });

  router.post('/:requestId/result', async (req, res) => {
    // The service checks that this runner holds the request (one lookup), then stores the figures.
    const body = parseBody(runnerEvaluationResultSchema, req.body);
    const answer: RunnerEvaluationResultAnswer = { evaluationId: await jobs().result(currentRunner(req), String(req.params['requestId']), body.results as EvaluationResults) };
    res.status(201).json(answer);
  });

  router.post('/:requestId/end', async (req, res) => {
    const body = parseBody(runnerEvaluationEndSchema, req.body);
    await jobs().finishHeld(currentRunner(req), String(req.params['requestId']), body);
    res.json({ ok: true });
  });

  return router;
}
