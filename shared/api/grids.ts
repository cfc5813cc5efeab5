/**
 * Grids of runs and the learnability check: request schemas and answer types of
 * `/api/benches/:benchId/grids/...` and `POST /api/benches/:benchId/corpora/:corpusId/learnability`.
 * A grid is a set of runs, one per cell of up to three axes (e.g. generative flow × state size × seed); the
 * server creates every run `queued` at once and the browser's run queue trains them. A learnability check
 * is a grid of kind `learnability` over one axis `model` (n-gram orders 1–5, GRU and state-space model at
 * state sizes 8/16/32) whose verdict table the server computes from the runs' stored summaries.
 */
import { z } from 'zod';
import { safeText } from './safe-text';
import { runPlacementSchema, type RunPlacement } from './runners';
import { flowStackSchema, RUN_FAMILIES, type RunDto, type RunFamily, type RunStatus } from './runs';

export const GRID_KINDS = ['grid', 'learnability'] as const;
export type GridKind = (typeof GRID_KINDS)[number];

export const MAX_GRID_AXES = 3;
export const MAX_GRID_CELLS = 64;

/** Figures a heat map can show, all from a run's stored summary. */
export const GRID_FIGURES = ['bestValidationBitsPerChar', 'lastBoundBitsPerChar', 'wordsPerSecond', 'parameterCount'] as const;
export type GridFigure = (typeof GRID_FIGURES)[number];
export const GRID_FIGURE_LABELS: Readonly<Record<GridFigure, { label: string; unit: string; higherIsBetter: boolean }>> = {
  // Neutral names: the state-space model's figures are bounds, the GRU's and n-gram's exact (figure-names.ts).
  bestValidationBitsPerChar: { label: 'Best validation figure', unit: 'bits/char', higherIsBetter: false },
  lastBoundBitsPerChar: { label: 'Final training figure', unit: 'bits/char', higherIsBetter: false },
  wordsPerSecond: { label: 'Training speed', unit: 'words/s', higherIsBetter: true },
  parameterCount: { label: 'Parameters', unit: 'count', higherIsBetter: false },
};

/** An axis key is a path into the run settings: `model.<field>` or `training.<field>` (e.g. `model.stateSize`). */
export const GRID_AXIS_KEY = /^(model|training)\.[a-zA-Z][a-zA-Z0-9]{0,39}$/;

export const gridAxisValueSchema = z.union([z.number().refine(Number.isFinite, 'Give finite numbers.'), safeText().max(60), z.boolean(), flowStackSchema], {
  error: 'Give each axis value as a number, a word, true/false or a flow (a list of layers).',
});
export type GridAxisValue = z.output<typeof gridAxisValueSchema>;

export const gridAxisSchema = z
  .object({
    key: z.string({ error: 'Name the setting of the axis, e.g. model.stateSize.' })
      .regex(GRID_AXIS_KEY, 'Name the axis setting as model.<field> or training.<field>, e.g. model.stateSize or training.seed.'),
    values: z.array(gridAxisValueSchema, { error: 'Give the axis values as a list.' })
      .min(1, 'Give each axis at least one value.')
      .max(MAX_GRID_CELLS, `Give each axis at most ${MAX_GRID_CELLS} values.`)
      .refine((vs) => new Set(vs.map((v) => JSON.stringify(v))).size === vs.length, 'Give each value of an axis only once.'),
  })
  .strict();
export type GridAxis = z.output<typeof gridAxisSchema>;

export function gridCellCount(axes: readonly { values: readonly unknown[] }[]): number {
  return axes.reduce((n, a) => n * a.values.length, 1);
}

/** Every cell's coordinates (one value index per axis), the last axis changing fastest. */
export function gridCoordinates(axes: readonly { values: readonly unknown[] }[]): number[][] {
  let out: number[][] = [[]];
  for (const axis of axes) out = out.flatMap((c) => axis.values.map((_, i) => [...c, i]));
  return out;
}

/** A short label of an axis value: flows as their layer kinds joined with ` + ` (e.g. "coupling + diag"). */
export function gridValueLabel(v: unknown): string {
  if (Array.isArray(v)) return v.map((l) => (l && typeof l === 'object' && 'kind' in l ? String((l as { kind: unknown }).kind) : String(l))).join(' + ');
  return String(v);
}

/** What people read for each axis a grid can vary (the learnability check's single axis is "model"). */
export const GRID_AXIS_LABELS: Readonly<Record<string, string>> = {
  'model.generativeFlow': 'Generative flow',
  'model.inferenceFlow': 'Inference flow',
  'model.stateSize': 'State size',
  'training.samples': 'Samples per word (K)',
  'training.seed': 'Seed',
  'training.learningRate': 'Learning rate',
  'model.order': 'n-gram order',
  model: 'Model',
};

export function gridAxisLabel(key: string): string {
  return GRID_AXIS_LABELS[key] ?? key.split('.').pop() ?? key;
}

/** A cell's label for people: "Generative flow: coupling + diag, State size 8"; a learnability model by its name. */
export function gridCellLabel(axes: readonly { key: string; values: readonly unknown[] }[], coords: readonly number[]): string {
  return axes.map((a, i) => {
    const value = gridValueLabel(a.values[coords[i]!]);
    if (a.key === 'model') return value;
    return Array.isArray(a.values[coords[i]!]) ? `${gridAxisLabel(a.key)}: ${value}` : `${gridAxisLabel(a.key)} ${value}`;
  }).join(', ');
}

const gridName = safeText('Give the grid a name.').trim().min(1, 'Give the grid a name.').max(120, 'Use a grid name of at most 120 characters.');

/**
 * `POST /grids`. `baseSettings` are run settings of the family (`{ model, training, split? }`); each cell
 * applies its axis values on top, and every cell's settings must pass the runs' settings schema.
 */
export const createGridSchema = z
  .object({
    name: gridName,
    corpusId: z.string({ error: 'Choose a corpus.' }).uuid('Choose a corpus from this bench.'),
    family: z.enum(RUN_FAMILIES, { error: 'Choose a model family: ssm, gru or ngram.' }),
    baseSettings: z.record(z.string(), z.unknown(), { error: 'Give the base settings as an object { model, training }.' }),
    axes: z.array(gridAxisSchema, { error: 'Give the axes as a list.' })
      .min(1, 'Give at least one axis.')
      .max(MAX_GRID_AXES, `Use at most ${MAX_GRID_AXES} axes.`)
      .refine((as) => new Set(as.map((a) => a.key)).size === as.length, 'Use each setting on one axis only.')
      .refine((as) => gridCellCount(as) <= MAX_GRID_CELLS, `A grid has at most ${MAX_GRID_CELLS} cells (the product of the axis lengths); remove values or an axis.`),
    figure: z.enum(GRID_FIGURES, { error: `Choose the figure to map: ${GRID_FIGURES.join(', ')}.` }).default('bestValidationBitsPerChar'),
    /** Where the grid's runs train (shared/api/runners.ts); the form picks `runners` when any runner is online. */
    placement: runPlacementSchema.default('tab'),
  })
  .strict();
export type CreateGridRequest = z.input<typeof createGridSchema>;

/** `DELETE /grids/:gridId?runs=archive|delete|keep` (default archive). */
export const deleteGridQuerySchema = z.object({
  runs: z.enum(['archive', 'delete', 'keep'], { error: 'Give runs as archive, delete or keep.' }).default('archive'),
});

/** One cell: its coordinates, its run (null once the run was deleted) and the run's figures. */
export interface GridCellDto {
  coords: number[];
  values: GridAxisValue[];
  label: string;
  run: { id: string; name: string; family: RunFamily; status: RunStatus; stepsDone: number; archived: boolean } | null;
  /** The grid's chosen figure for this cell (null until the run reports it). */
  figure: number | null;
  /** Best validation and final training bounds, bits per character (costs: the negated log-likelihood bound, lower is better). */
  best: number | null;
  final: number | null;
  wordsPerSecond: number | null;
  parameterCount: number | null;
}

export interface GridSummaryDto {
  id: string;
  benchId: string;
  corpus: { id: string; name: string } | null;
  name: string;
  kind: GridKind;
  /** The family of every run; null for a learnability check (mixed families). */
  family: RunFamily | null;
  axes: GridAxis[];
  baseSettings: Record<string, unknown>;
  figure: GridFigure;
  createdBy: { id: string; displayName: string } | null;
  createdAt: string;
  cellCount: number;
  /** How many cells' runs are in each status (deleted runs are not counted). */
  progress: Partial<Record<RunStatus, number>>;
  /** Every remaining run is finished, stopped or failed. */
  done: boolean;
  /** Whether the caller may delete the grid (its creator, coaches, owners). */
  canDelete: boolean;
  /** Where its runs train. */
  placement: RunPlacement;
}

export interface GridDto extends GridSummaryDto {
  cells: GridCellDto[];
}

// ---------------------------------------------------------------- learnability check

export const LEARNABILITY_NGRAM_ORDERS = [1, 2, 3, 4, 5] as const;
export const LEARNABILITY_STATE_SIZES = [8, 16, 32] as const;
/**
 * "On par": the state-space model's bits/char is at most this much above the GRU's at the same state size.
 * 0.05 bits/char is common practice (no source): about the spread of repeated short trainings of small
 * models on a few thousand words.
 */
export const LEARNABILITY_TOLERANCE_BITS = 0.05;

export const learnabilityRequestSchema = z
  .object({
    budgetSteps: z.number({ error: 'Give the training budget in steps as a number.' }).int('Give the budget as a whole number of steps.')
      .min(1, 'Give a budget of at least 1 step.').max(100_000, 'Give a budget of at most 100000 steps.'),
    name: gridName.optional(),
    seed: z.number({ error: 'Give the seed as a number.' }).int('Give the seed as a whole number.').min(0).max(2 ** 31 - 1).default(1),
    placement: runPlacementSchema.default('tab'),
  })
  .strict();
export type LearnabilityRequest = z.input<typeof learnabilityRequestSchema>;

export interface LearnabilityRow {
  /** `ngram-3`, `gru-16`, `ssm-8` (the value on the grid's `model` axis). */
  model: string;
  family: RunFamily;
  /** n-gram order or state size. */
  size: number;
  runId: string | null;
  status: RunStatus | null;
  /** Held-out bits per character (−best validation bound; for the SSM an upper bound); null until known. */
  bitsPerChar: number | null;
  /** Held-out bits per word at the same step (absent in runs that did not report it); null until known. */
  bitsPerWord?: number | null;
  /**
   * bitsPerChar − the best n-gram's bits per character (≥ 0: worse than the best n-gram). The best n-gram is a
   * reference point, not a floor: a neural model can beat it.
   */
  gapToNgramFloor: number | null;
}

export interface LearnabilityComparison {
  stateSize: number;
  gruBitsPerChar: number | null;
  ssmBitsPerChar: number | null;
  /** ssm − gru in bits per character (negative: the SSM is better). */
  difference: number | null;
  /** Within the tolerance (or better); null until both runs have a figure. */
  onPar: boolean | null;
}

/** `GET /grids/:gridId/verdict` of a learnability check. */
export interface LearnabilityVerdict {
  gridId: string;
  toleranceBits: number;
  budgetSteps: number;
  ngramFloor: { order: number; bitsPerChar: number } | null;
  rows: LearnabilityRow[];
  comparisons: LearnabilityComparison[];
  /** Every run has finished and reported a figure. */
  complete: boolean;
}

/** Re-exported for clients that show a grid cell's run. */
export type { RunDto };
