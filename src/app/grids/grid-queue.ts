import { Injectable, inject } from '@angular/core';
import type { GridDto } from '../../../shared/api/grids';
import type { CheckpointDto } from '../../../shared/api/runs';
import { RunScheduler } from '../runs/run-scheduler';
import { RunsApi } from '../runs/runs-api';

const UNFINISHED = ['queued', 'training', 'paused'];

/**
 * Hands a grid's unfinished runs to the tab's run scheduler (which trains as many at once as the cores allow).
 * A run that already has a checkpoint continues from its latest one, so a grid survives a reload or a closed tab.
 */
@Injectable({ providedIn: 'root' })
export class GridQueue {
  private readonly runs = inject(RunsApi);
  private readonly scheduler = inject(RunScheduler);

  /** Runs of the grid that wait for a worker but are not in this tab's queue (they need "train here"); none for a runner grid. */
  orphans(grid: GridDto): string[] {
    // A grid sent to the runners is theirs to train: this tab never picks up its runs.
    if (grid.placement === 'runners') return [];
    return grid.cells
      .map((c) => c.run)
      .filter((r): r is NonNullable<typeof r> => !!r && !r.archived && UNFINISHED.includes(r.status))
      .filter((r) => {
        const live = this.scheduler.live(r.id);
        return !live || !(live.isActive || live.state() === 'waiting' || live.state() === 'elsewhere');
      })
      .map((r) => r.id);
  }

  /** Queues every orphan the caller may train; returns how many were queued. */
  async pickUp(benchId: string, grid: GridDto): Promise<number> {
    let queued = 0;
    for (const runId of this.orphans(grid)) {
      const [run, checkpoints] = await Promise.all([this.runs.get(benchId, runId), this.runs.checkpoints(benchId, runId)]);
      if (!run.canControl || !UNFINISHED.includes(run.status) || run.placement === 'runners') continue;
      const latest = checkpoints.reduce<CheckpointDto | null>((a, c) => (!a || c.step > a.step ? c : a), null);
      await this.scheduler.enqueue(benchId, run, latest?.id ?? null);
      queued += 1;
    }
    return queued;
  }
}
