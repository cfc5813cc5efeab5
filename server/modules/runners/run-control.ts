/**
 * `POST /runs/:runId/control` for both placements. A runner run that a runner holds gets the request recorded
 * (the runner saves a checkpoint and pauses or stops within one progress interval); any other run changes status
 * at once. `resume` queues a paused or ended run again (a runner run goes back on the queue and resumes from its
 * latest checkpoint). A pause or stop after the end, or a resume of a run that waits or trains, changes nothing
 * and says so in `message`.
 */
import type { RunControlAction } from '../../../shared/api/runners';
import type { AppContext } from '../../app-context';
import type { Run } from '../runs/run.entity';
import { END_STATUSES, lateRequestMessage, RunService, type RunChange } from '../runs/run.service';
import type { User } from '../users/user.entity';

export async function controlRun(ctx: AppContext, run: Run, action: RunControlAction, me: User): Promise<RunChange> {
  const service = new RunService(ctx);
  return service.locked(run, async () => {
    const now = ctx.clock.now();
    if (action === 'resume') {
      if (run.status === 'queued' || run.status === 'training') {
        return { run, message: `"${run.name}" is ${run.status} already; nothing to resume.` };
      }
      const before = run.status;
      service.applyStatus(run, { status: 'queued', actor: me });
      await ctx.orm.em.flush();
      await service.afterChange(run, before);
      return { run };
    }
    const to = action === 'pause' ? 'paused' : 'stopped';
    if (END_STATUSES.includes(run.status) && run.status !== to) return { run, message: lateRequestMessage(run, to) };
    if (run.status === to) return { run, message: `"${run.name}" is ${to} already.` };
    const held = run.placement === 'runners' && run.runner && run.leaseExpiresAt && run.leaseExpiresAt > now && run.status === 'training';
    if (held) return service.requestControl(run, action as 'pause' | 'stop');
    const before = run.status;
    service.applyStatus(run, { status: to, actor: me });
    await ctx.orm.em.flush();
    await service.afterChange(run, before);
    return { run };
  });
}
