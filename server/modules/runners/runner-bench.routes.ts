/**
 * Bench routes of the runners module, under /api/benches/:benchId:
 *  - `GET /runner-status` (viewer+): whether runners are online and the bench's queue, for the run forms;
 *  - `POST /runs/:runId/control` (creator or coach+): pause, resume or stop a run of either placement;
 *  - `GET /events` and `GET /runs/:runId/events` (viewer+): server-sent events of run changes.
 */
import { Router, type Request, type Response } from 'express';
import { runControlSchema, type RunnerAvailability } from '../../../shared/api/runners';
import { roleAtLeast, type Role } from '../../../shared/api/types';
import type { AppContext } from '../../app-context';
import { requireRole } from '../../middleware/bench-access';
import { leaveRequestLine } from '../../middleware/request-gate';
import { parseBody } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { loadRun, requireControl } from '../runs/run-access';
import { RunRepository } from '../runs/run.repository';
import type { User } from '../users/user.entity';
import { controlRun } from './run-control';
import type { RunEvent } from './run-events';
import { isOnline, RunnerRepository } from './runner.repository';

/** A comment line this often keeps proxies from closing an idle stream. */
export const KEEP_ALIVE_MS = 15_000;

function canControlFor(user: User, role: Role, createdById: string | null): boolean {
  return roleAtLeast(role, 'coach') || (roleAtLeast(role, 'member') && createdById === user.id);
}

/** Streams the bench's run events (one run's, when `runId` is given) until the client goes away. */
function streamEvents(ctx: AppContext, req: Request, res: Response, filter: { runId: string | null; names: RunEvent['name'][] }, first: RunEvent | null): void {
  const { bench, role } = currentBench(req);
  const user = currentUser(req);
  res.status(200);
  res.set({ 'Content-Type': 'text/event-stream; charset=utf-8', 'Cache-Control': 'no-store', Connection: 'keep-alive', 'X-Accel-Buffering': 'no' });
  res.flushHeaders();
  leaveRequestLine(res);
  const send = (event: RunEvent) => {
    if (filter.runId !== null && event.runId !== filter.runId) return;
    if (!filter.names.includes(event.name)) return;
    const data = event.name === 'run' ? { ...event.data, canControl: canControlFor(user, role, event.data.createdBy?.id ?? null) } : event.data;
    res.write(`event: ${event.name}\ndata: ${JSON.stringify(data)}\n\n`);
  };
  res.write(': connected\n\n');
  if (first) send(first);
  const unsubscribe = ctx.runEvents.subscribe(bench.id, send);
  const keepAlive = setInterval(() => res.write(': keep-alive\n\n'), KEEP_ALIVE_MS);
  let closed = false;
  const close = () => {
    if (closed) return;
    closed = true;
    clearInterval(keepAlive);
    unsubscribe();
  };
  req.on('close', close);
  res.on('close', close);
  res.on('error', close);
}

export function runnerBenchRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });

  router.get('/runner-status', requireRole('viewer'), async (req, res) => {
    const { bench, role } = currentBench(req);
    const now = ctx.clock.now();
    const repo = new RunnerRepository(ctx.orm.em);
    const online = (await repo.listAll()).filter((r) => isOnline(r, now));
    const counts = await repo.queueCounts(bench.id);
    const body: RunnerAvailability = {
      backend: ctx.runQueue.backend,
      onlineRunners: online.length,
      onlineThreads: online.reduce((sum, r) => sum + (r.threads ?? 0), 0),
      waiting: counts.waiting,
      active: counts.active,
      canSend: roleAtLeast(role, 'member'),
    };
    res.json(body);
  });

  router.post('/runs/:runId/control', requireRole('member'), async (req, res) => {
    const run = await loadRun(ctx, req);
    requireControl(req, run);
    const { action } = parseBody(runControlSchema, req.body);
    const me = currentUser(req);
    const change = await controlRun(ctx, run, action, me);
    const dto = await new RunRepository(ctx.orm.em).dto(change.run, me, currentBench(req).role);
    res.json(change.message ? { ...dto, message: change.message } : dto);
  });

  router.get('/events', requireRole('viewer'), (req, res) => {
    streamEvents(ctx, req, res, { runId: null, names: ['run', 'deleted'] }, null);
  });

  router.get('/runs/:runId/events', requireRole('viewer'), async (req, res) => {
    const run = await loadRun(ctx, req);
    const dto = await new RunRepository(ctx.orm.em).dto(run, currentUser(req), currentBench(req).role);
    streamEvents(ctx, req, res, { runId: run.id, names: ['run', 'progress', 'metrics', 'deleted'] }, { name: 'run', benchId: run.bench.id, runId: run.id, data: dto });
  });

  return router;
}
