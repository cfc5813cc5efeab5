/**
 * /api/runners (instance admin): the runners with their heartbeat, jobs and throughput, the queue depth (runs, and
 * evaluation requests waiting), new
 * runner tokens (shown once) and revocation. Revoking gives the runner's runs back to the queue.
 */
import { Router, type RequestHandler } from 'express';
import { ErrorCode } from '../../../shared/api/errors';
import { createRunnerSchema, type CreatedRunner, type RunnersOverview } from '../../../shared/api/runners';
import type { AppContext } from '../../app-context';
import { conflict, HttpError, notFound } from '../../http-error';
import { parseBody } from '../../middleware/validate';
import { currentUser } from '../../request-state';
import { RunnerRepository, toRunnerDto } from './runner.repository';
import { RunnerJobService } from './runner-job.service';
import { UUID } from '../../ids';

const requireAdmin: RequestHandler = (req, _res, next) => {
  if (!currentUser(req).isAdmin) throw new HttpError(403, ErrorCode.RoleTooLow, 'Only the instance admin manages runners.');
  next();
};

/** Mounted at /api/runners behind requireAuth. */
export function runnerAdminRoutes(ctx: AppContext): Router {
  const router = Router();
  router.use(requireAdmin);
  const runners = () => new RunnerRepository(ctx.orm.em);

  router.get('/', async (_req, res) => {
    const now = ctx.clock.now();
    const repo = runners();
    const held = await repo.heldRuns(now);
    const evaluating = await repo.heldEvaluations(now);
    const list = (await repo.listAll()).map((r) => toRunnerDto(r, held.filter((run) => run.runner?.id === r.id), now,
      evaluating.filter((q) => q.runner?.id === r.id)));
    const body: RunnersOverview = { backend: ctx.runQueue.backend, runners: list, queue: { ...(await repo.queueCounts()), evaluationsWaiting: await repo.evaluationsWaiting() } };
    res.json(body);
  });

  router.post('/', async (req, res) => {
    const { name } = parseBody(createRunnerSchema, req.body);
    const { runner, token } = runners().create(name, 'remote', ctx.clock.now());
    await ctx.orm.em.flush();
    const body: CreatedRunner = { runner: toRunnerDto(runner, [], ctx.clock.now()), token };
    res.status(201).json(body);
  });

  router.delete('/:runnerId', async (req, res) => {
    const id = String(req.params['runnerId'] ?? '');
    const runner = UUID.test(id) ? await runners().findById(id) : null;
    if (!runner) throw notFound('This runner');
    if (runner.kind === 'embedded') {
      throw conflict(ErrorCode.Conflict, 'The runner threads of this server have no token to revoke; set RUNNER_THREADS=0 and restart the server to turn them off.');
    }
    if (!runner.revokedAt) {
      runner.revokedAt = ctx.clock.now();
      await ctx.orm.em.flush();
      await new RunnerJobService(ctx).releaseAll(runner);
    }
    const now = ctx.clock.now();
    res.json(toRunnerDto(runner, [], now));
  });

  return router;
}
