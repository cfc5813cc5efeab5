/**
 * Builds a report's snapshot from its sources at creation time: an evaluation (its figures), a comparison
 * of runs (their settings, summaries and bound curves) or a grid (its cells, and the verdict of a
 * learnability check). Unknown ids answer 422 on `sourceIds` and nothing is stored.
 */
import type { EntityManager } from '@mikro-orm/better-sqlite';
import {
  comparisonEvaluation,
  comparisonFigures,
  type ComparisonEvaluation,
  evaluationFigures,
  gridFigures,
  type ComparisonCurves,
  type ReportKind,
  type ReportSnapshot,
} from '../../../shared/api/reports';
import type { Role } from '../../../shared/api/types';
import { validationFailed } from '../../http-error';
import type { Bench } from '../benches/bench.entity';
import { Evaluation } from '../evaluations/evaluation.entity';
import { EvaluationRepository, toEvaluationDto } from '../evaluations/evaluation.repository';
import { GridRepository } from '../grids/grid.repository';
import { verdictOfGrid } from '../grids/learnability';
import { MetricRepository } from '../runs/metric.repository';
import { Run } from '../runs/run.entity';
import { canControlRun, RunRepository, toRunDto } from '../runs/run.repository';
import type { User } from '../users/user.entity';

const CURVE_SERIES = ['train_bound', 'valid_bound'];
const MAX_CURVE_POINTS = 500;

/** Every n-th point so at most `max` remain, always keeping the last one. */
function thin(steps: number[], values: number[], max: number): { steps: number[]; values: number[] } {
  if (steps.length <= max) return { steps, values };
  const every = Math.ceil(steps.length / max);
  const keep = steps.map((_, i) => i).filter((i) => i % every === 0 || i === steps.length - 1);
  return { steps: keep.map((i) => steps[i]!), values: keep.map((i) => values[i]!) };
}

/**
 * Each run's latest evaluation (held-out cost with its standard error, cross entropy), as the compare page
 * shows it: two queries whatever the number of runs (the newest per run, then only those with their results).
 */
async function latestEvaluations(em: EntityManager, bench: Bench, runs: Run[]): Promise<Record<string, ComparisonEvaluation>> {
  if (runs.length === 0) return {};
  const all = await em.find(Evaluation, { bench, run: { $in: runs } }, { orderBy: { createdAt: 'desc', id: 'asc' } });
  const newest = new Map<string, string>();
  for (const e of all) if (!newest.has(e.run.id)) newest.set(e.run.id, e.id);
  if (newest.size === 0) return {};
  const full = await em.find(Evaluation, { id: { $in: [...newest.values()] }, bench }, { populate: ['run', 'createdBy', 'checkpoint', 'results'] });
  return Object.fromEntries(full.map((e) => [e.run.id, comparisonEvaluation(toEvaluationDto(e))]));
}

export async function buildSnapshot(em: EntityManager, bench: Bench, me: User, role: Role, kind: ReportKind, ids: string[]): Promise<ReportSnapshot> {
  if (kind === 'evaluation') {
    const found = await new EvaluationRepository(em).find(bench, ids[0]!);
    if (!found) throw validationFailed({ sourceIds: 'Choose an evaluation of this bench; this one does not exist here.' });
    const evaluation = toEvaluationDto(found);
    return { figures: evaluationFigures(evaluation), evaluation };
  }
  if (kind === 'comparison') {
    const unique = [...new Set(ids)];
    const found = await em.find(Run, { id: { $in: unique }, bench }, { populate: ['corpus', 'createdBy'] });
    if (found.length !== unique.length) throw validationFailed({ sourceIds: 'Choose runs of this bench; at least one of these does not exist here.' });
    const order = new Map(unique.map((id, i) => [id, i]));
    found.sort((a, b) => order.get(a.id)! - order.get(b.id)!);
    const metrics = new MetricRepository(em);
    const checkpoints = await new RunRepository(em).checkpointCounts(found.map((r) => r.id));
    const runs = found.map((run) => toRunDto(run, checkpoints.get(run.id) ?? 0, canControlRun(run, me, role)));
    const curves: ComparisonCurves = {};
    const evaluations = await latestEvaluations(em, bench, found);
    for (const run of found) {
      const page = await metrics.read(run, { series: CURVE_SERIES, sinceStep: -1, limit: 50_000 });
      curves[run.id] = Object.fromEntries(Object.entries(page.series).map(([name, s]) => [name, thin(s.steps, s.values, MAX_CURVE_POINTS)]));
    }
    return { figures: comparisonFigures(runs, evaluations), runs, curves, evaluations };
  }
  const grids = new GridRepository(em);
  const grid = await grids.find(bench, ids[0]!);
  if (!grid) throw validationFailed({ sourceIds: 'Choose a grid of this bench; this one does not exist here.' });
  const runs = await grids.runsOf(grid);
  const dto = grids.dto(grid, runs, me, role);
  const verdict = grid.kind === 'learnability' ? verdictOfGrid(grid.id, grid.budgetSteps, dto.cells, runs) : undefined;
  return { figures: gridFigures(dto, verdict), grid: dto, ...(verdict ? { verdict } : {}) };
}
