/**
 * The learnability check: the runs it creates (n-gram orders 1–5, GRU and state-space model at state sizes
 * 8/16/32, the same training budget) and the verdict table computed from the runs' stored summaries.
 * Bits per character are the negated best validation bound (the final training bound when no validation
 * figure was reported); for the state-space model that is an upper bound on its true bits per character.
 */
import {
  LEARNABILITY_NGRAM_ORDERS,
  LEARNABILITY_STATE_SIZES,
  LEARNABILITY_TOLERANCE_BITS,
  type LearnabilityComparison,
  type LearnabilityRow,
  type LearnabilityVerdict,
} from '../../../shared/api/grids';
import type { RunFamily, RunSettings, RunStatus, RunSummary } from '../../../shared/api/runs';
import { NEW_RUN_TRAINING_DEFAULTS as T } from '../../../shared/model/settings-rules';

export interface LearnabilityCell {
  model: string;
  family: RunFamily;
  size: number;
  settings: RunSettings;
}

/** The eleven runs of a check, in the order of the grid's single `model` axis. */
export function learnabilityCells(budgetSteps: number, seed: number, split: NonNullable<RunSettings['split']>): LearnabilityCell[] {
  const training = {
    steps: budgetSteps, batchSize: 32, samples: 8, learningRate: T.learningRate, clipNorm: T.clipNorm, warmupSteps: T.warmupSteps,
    observationInitScale: T.observationInitScale, regime: 'token' as const,
    seed, evalEvery: Math.max(1, Math.ceil(budgetSteps / 10)), evalSamples: 64, checkpointEvery: 0,
  };
  const cells: LearnabilityCell[] = LEARNABILITY_NGRAM_ORDERS.map((order) => ({
    model: `ngram-${order}`, family: 'ngram' as const, size: order, settings: { model: { order, discount: null }, split },
  }));
  for (const stateSize of LEARNABILITY_STATE_SIZES) {
    cells.push({ model: `gru-${stateSize}`, family: 'gru', size: stateSize, settings: { model: { stateSize, embeddingSize: 16, observationHidden: 0 }, training, split } });
  }
  for (const stateSize of LEARNABILITY_STATE_SIZES) {
    cells.push({
      model: `ssm-${stateSize}`, family: 'ssm', size: stateSize,
      settings: {
        model: { stateSize, generativeFlow: [{ kind: 'diag' }], inferenceFlow: [{ kind: 'diag' }], flowHidden: 32, observationHidden: 0, embeddingSize: 16, encoderSize: 32, proposalHidden: 32 },
        training, split,
      },
    });
  }
  return cells;
}

export interface VerdictInput {
  model: string;
  run: { id: string; status: RunStatus; summary: RunSummary } | null;
}

/**
 * Held-out bits per character of a run from its summary: bound figures are stored as costs (the negated
 * log-likelihood bound in bits per character, lower is better — see DEVELOPERS.md, "Runs").
 */
export function bitsPerCharOf(summary: RunSummary): number | null {
  const bound = summary.bestValidationBitsPerChar ?? summary.lastBoundBitsPerChar ?? null;
  return bound === null || !Number.isFinite(bound) ? null : bound;
}

/** Bits per word beside `bitsPerCharOf`: only when the figure is the best validation one (its step's per-word figure). */
export function bitsPerWordOf(summary: RunSummary): number | null {
  const v = summary.bestValidationBitsPerChar != null ? summary.bestValidationBitsPerWord : null;
  return v === null || v === undefined || !Number.isFinite(v) ? null : v;
}

function parseModel(model: string): { family: RunFamily; size: number } {
  const [family, size] = model.split('-');
  return { family: family as RunFamily, size: Number(size) };
}

export function learnabilityVerdict(gridId: string, budgetSteps: number, cells: readonly VerdictInput[],
                                    toleranceBits = LEARNABILITY_TOLERANCE_BITS): LearnabilityVerdict {
  const rows: LearnabilityRow[] = cells.map((c) => ({
    model: c.model, ...parseModel(c.model), runId: c.run?.id ?? null, status: c.run?.status ?? null,
    bitsPerChar: c.run ? bitsPerCharOf(c.run.summary) : null, bitsPerWord: c.run ? bitsPerWordOf(c.run.summary) : null, gapToNgramFloor: null,
  }));
  let floor: { order: number; bitsPerChar: number } | null = null;
  for (const r of rows) {
    if (r.family === 'ngram' && r.bitsPerChar !== null && (floor === null || r.bitsPerChar < floor.bitsPerChar)) floor = { order: r.size, bitsPerChar: r.bitsPerChar };
  }
  for (const r of rows) r.gapToNgramFloor = floor && r.bitsPerChar !== null ? r.bitsPerChar - floor.bitsPerChar : null;
  const comparisons: LearnabilityComparison[] = LEARNABILITY_STATE_SIZES.map((stateSize) => {
    const gru = rows.find((r) => r.family === 'gru' && r.size === stateSize)?.bitsPerChar ?? null;
    const ssm = rows.find((r) => r.family === 'ssm' && r.size === stateSize)?.bitsPerChar ?? null;
    const difference = gru !== null && ssm !== null ? ssm - gru : null;
    return { stateSize, gruBitsPerChar: gru, ssmBitsPerChar: ssm, difference, onPar: difference === null ? null : difference <= toleranceBits };
  });
  const complete = cells.every((c) => c.run !== null && c.run.status === 'finished') && rows.every((r) => r.bitsPerChar !== null);
  return { gridId, toleranceBits, budgetSteps, ngramFloor: floor, rows, comparisons, complete };
}

/** The verdict of a learnability grid from its cells (as in the grid's DTO) and its runs. */
export function verdictOfGrid(gridId: string, budgetSteps: number | null,
                              cells: readonly { values: unknown[]; run: { id: string } | null }[],
                              runs: readonly { id: string; status: RunStatus; summary: RunSummary }[]): LearnabilityVerdict {
  const byId = new Map(runs.map((r) => [r.id, r]));
  return learnabilityVerdict(gridId, budgetSteps ?? 0, cells.map((c) => {
    const run = c.run ? byId.get(c.run.id) ?? null : null;
    return { model: String(c.values[0]), run: run ? { id: run.id, status: run.status, summary: run.summary } : null };
  }));
}
