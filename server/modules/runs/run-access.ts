/** Finding a run of the current bench and checking that the caller may control it. */
import type { Request } from 'express';
import type { AppContext } from '../../app-context';
import { notFound, roleTooLow } from '../../http-error';
import { currentBench, currentUser } from '../../request-state';
import type { Run } from './run.entity';
import { canControlRun, RunRepository } from './run.repository';
import { UUID } from '../../ids';

/** The run named by `:runId` if it belongs to the bench of the request; 404 otherwise. */
export async function loadRun(ctx: AppContext, req: Request): Promise<Run> {
  const id = String(req.params['runId'] ?? '');
  if (!UUID.test(id)) throw notFound('This run');
  const run = await new RunRepository(ctx.orm.em).find(currentBench(req).bench, id);
  if (!run) throw notFound('This run');
  return run;
}

/** 403 unless the caller created the run (as member or above) or is a coach or owner of the bench. */
export function requireControl(req: Request, run: Run): void {
  const { role } = currentBench(req);
  if (!canControlRun(run, currentUser(req), role)) {
    throw roleTooLow(`Only the person who started "${run.name}", a coach or an owner may change it; ask one of them.`);
  }
}
