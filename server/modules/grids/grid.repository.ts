import type { EntityManager } from '@mikro-orm/core';
import { gridCoordinates, type GridDto, type GridFigure, type GridSummaryDto } from '../../../shared/api/grids';
import { ACTIVE_RUN_STATUSES, type RunStatus, type RunSummary } from '../../../shared/api/runs';
import { roleAtLeast, type Role } from '../../../shared/api/types';
import type { Bench } from '../benches/bench.entity';
import { Run } from '../runs/run.entity';
import type { User } from '../users/user.entity';
import { cellLabel } from './grid-cells';
import { Grid } from './grid.entity';

export function canDeleteGrid(grid: Grid, user: User, role: Role): boolean {
  return roleAtLeast(role, 'coach') || (roleAtLeast(role, 'member') && grid.createdBy?.id === user.id);
}

const figureOf = (s: RunSummary, f: GridFigure): number | null => {
  const v = s[f];
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
};

export class GridRepository {
  constructor(private readonly em: EntityManager) {}

  find(bench: Bench, id: string): Promise<Grid | null> {
    return this.em.findOne(Grid, { id, bench }, { populate: ['corpus', 'createdBy'] });
  }

  list(bench: Bench, kind?: 'grid' | 'learnability'): Promise<Grid[]> {
    return this.em.find(Grid, { bench, ...(kind ? { kind } : {}) }, { orderBy: { createdAt: 'desc', id: 'asc' }, populate: ['corpus', 'createdBy'] });
  }

  runsOf(grid: Grid): Promise<Run[]> {
    return this.em.find(Run, { grid }, { orderBy: { createdAt: 'asc', id: 'asc' } });
  }

  summary(grid: Grid, runs: readonly Run[], user: User, role: Role): GridSummaryDto {
    const progress: Partial<Record<RunStatus, number>> = {};
    for (const r of runs) progress[r.status] = (progress[r.status] ?? 0) + 1;
    return {
      id: grid.id,
      benchId: grid.bench.id,
      corpus: grid.corpus ? { id: grid.corpus.id, name: grid.corpus.name } : null,
      name: grid.name,
      kind: grid.kind,
      family: grid.family,
      axes: grid.axes,
      baseSettings: grid.baseSettings,
      figure: grid.figure,
      createdBy: grid.createdBy ? { id: grid.createdBy.id, displayName: grid.createdBy.displayName } : null,
      createdAt: grid.createdAt.toISOString(),
      cellCount: gridCoordinates(grid.axes).length,
      progress,
      done: runs.every((r) => !ACTIVE_RUN_STATUSES.includes(r.status)),
      canDelete: canDeleteGrid(grid, user, role),
      placement: runs.some((r) => r.placement === 'runners') ? 'runners' : 'tab',
    };
  }

  dto(grid: Grid, runs: readonly Run[], user: User, role: Role): GridDto {
    const byCell = new Map(runs.map((r) => [JSON.stringify(r.gridCell), r]));
    const cells = gridCoordinates(grid.axes).map((coords) => {
      const run = byCell.get(JSON.stringify(coords)) ?? null;
      const s = run?.summary ?? {};
      return {
        coords,
        values: grid.axes.map((a, i) => a.values[coords[i]!]!),
        label: cellLabel(grid.axes, coords),
        run: run ? { id: run.id, name: run.name, family: run.family, status: run.status, stepsDone: run.stepsDone, archived: run.archived } : null,
        figure: run ? figureOf(s, grid.figure) : null,
        best: figureOf(s, 'bestValidationBitsPerChar'),
        final: figureOf(s, 'lastBoundBitsPerChar'),
        wordsPerSecond: figureOf(s, 'wordsPerSecond'),
        parameterCount: figureOf(s, 'parameterCount'),
      };
    });
    return { ...this.summary(grid, runs, user, role), cells };
  }
}
