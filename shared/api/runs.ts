/**
 * Runs, metric points and checkpoints: the request schemas (zod) and answer types of
 * `/api/benches/:benchId/runs/...`, shared so the new-run form shows the same messages the server sends.
 * No model code is imported here (that would pull TF.js into every page); families, flow kinds and limits
 * come from `shared/model/settings-rules.ts` (plain constants), and a spec checks that everything agrees.
 */
import { z } from 'zod';
import { FLOW_KIND_NAMES, KN_DISCOUNT_RANGE, MODEL_FAMILIES, OBSERVATION_INIT_SCALE_RANGE, SETTING_LIMITS } from '../model/settings-rules';
import { safeText } from './safe-text';
import { runPlacementSchema, type RunLiveProgress, type RunPlacement } from './runners';

export const RUN_FAMILIES = MODEL_FAMILIES;
export type RunFamily = (typeof RUN_FAMILIES)[number];

export const RUN_STATUSES = ['queued', 'training', 'paused', 'finished', 'stopped', 'failed'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];

/**
 * The status machine. A run may go from a status to the ones listed; staying in the same status is
 * always allowed (a progress update). `training → queued` puts a run back in line (e.g. the tab that
 * trained it was closed); the three end states can be resumed from a checkpoint. The server answers a pause
 * or stop that arrives after a run ended as a no-op (200 with the unchanged run and a `message`), not 409.
 */
export const RUN_TRANSITIONS: Readonly<Record<RunStatus, readonly RunStatus[]>> = {
  queued: ['training', 'stopped', 'failed'],
  training: ['paused', 'finished', 'stopped', 'failed', 'queued'],
  // paused → finished: the trainer reached its last step while a pause was on its way.
  paused: ['training', 'queued', 'stopped', 'failed', 'finished'],
  finished: ['queued', 'training'],
  stopped: ['queued', 'training'],
  failed: ['queued', 'training'],
};

export function canMoveRun(from: RunStatus, to: RunStatus): boolean {
  return from === to || RUN_TRANSITIONS[from].includes(to);
}

/** Statuses in which a worker may be busy with the run (it cannot be archived or deleted then). */
export const ACTIVE_RUN_STATUSES: readonly RunStatus[] = ['queued', 'training', 'paused'];

export const FLOW_LAYER_KINDS = FLOW_KIND_NAMES;
export const CHECKPOINT_REASONS = ['auto', 'stop', 'manual', 'import'] as const;
export type CheckpointReason = (typeof CHECKPOINT_REASONS)[number];

/** Metric series the workbench writes; other names of the same form are accepted too. */
export const KNOWN_METRIC_SERIES = ['train_bound', 'valid_bound', 'obs_entropy', 'noise_mi', 'words_per_second'] as const;
export const METRIC_SERIES_PATTERN = /^[a-z][a-z0-9_]{0,39}$/;
export const MAX_METRIC_POINTS_PER_REQUEST = 5000;
/** Automatic checkpoints kept per run (older automatic ones are removed; stop, manual and import ones stay). */
export const AUTO_CHECKPOINTS_KEPT = 10;

const whole = (name: string, min: number, max: number) =>
  z
    .number({ error: `Give ${name} as a number.` })
    .int(`Give ${name} as a whole number.`)
    .min(min, `Give ${name} of at least ${min}.`)
    .max(max, `Give ${name} of at most ${max}.`);

/** A whole-number setting with its limits from shared/model/settings-rules.ts. */
const limited = (name: string, key: keyof typeof SETTING_LIMITS) => whole(name, SETTING_LIMITS[key][0], SETTING_LIMITS[key][1]);

const positive = (name: string, max: number) =>
  z
    .number({ error: `Give ${name} as a number.` })
    .gt(0, `Give ${name} above 0.`)
    .max(max, `Give ${name} of at most ${max}.`);

export const flowStackSchema = z
  .array(z.object({ kind: z.enum(FLOW_LAYER_KINDS, { error: `Choose each flow layer from ${FLOW_LAYER_KINDS.join(', ')}.` }) }).strict(), {
    error: 'Give the flow as a list of layers, e.g. [{ "kind": "diag" }].',
  })
  .min(SETTING_LIMITS.flowLayers[0], 'A flow needs at least one layer.')
  .max(SETTING_LIMITS.flowLayers[1], `Use at most ${SETTING_LIMITS.flowLayers[1]} layers in a flow.`);

/** The state-space model's shape (MODEL.md sections 2–4); the vocabulary size comes from the corpus. */
export const ssmModelSchema = z
  .object({
    stateSize: limited('a state size', 'stateSize'),
    generativeFlow: flowStackSchema,
    inferenceFlow: flowStackSchema,
    flowHidden: limited('a flow network width', 'flowHidden'),
    observationHidden: limited('an observation width (0 = linear)', 'observationHidden'),
    embeddingSize: limited('an embedding size', 'embeddingSize'),
    encoderSize: limited('an encoder size', 'encoderSize'),
    proposalHidden: limited('a proposal width', 'proposalHidden'),
  })
  .strict();

/** The teacher-forced GRU baseline (MODEL.md section 6). */
export const gruModelSchema = z
  .object({
    stateSize: limited('a state size', 'stateSize'),
    embeddingSize: limited('an embedding size', 'embeddingSize'),
    observationHidden: limited('an observation width (0 = linear)', 'observationHidden'),
  })
  .strict();

/** The Kneser–Ney n-gram baseline; `discount: null` = modified KN with estimated discounts. */
export const ngramModelSchema = z
  .object({
    order: limited('an n-gram order', 'ngramOrder'),
    discount: z.number({ error: 'Give the discount as a number, or null to estimate it.' })
      .gt(KN_DISCOUNT_RANGE.above, `Give a discount above ${KN_DISCOUNT_RANGE.above}.`)
      .lte(KN_DISCOUNT_RANGE.atMost, `Give a discount of at most ${KN_DISCOUNT_RANGE.atMost}.`).nullable().default(null),
  })
  .strict();

export const trainingSchema = z
  .object({
    steps: whole('a number of steps', 1, 1_000_000),
    batchSize: whole('a batch size', 1, 4096),
    /** Importance samples K per word (state-space model only). */
    samples: limited('a number of samples K', 'samples').default(8),
    learningRate: positive('a learning rate', 1),
    /** Clip the gradient's global norm to this value; 0 = no clipping. */
    clipNorm: z.number({ error: 'Give the clipping norm as a number (0 = off).' }).min(0, 'Give a clipping norm of 0 (off) or more.').max(1e6, 'Give a clipping norm of at most 1000000.').default(0),
    /** Steps over which the warm-up weight rises to 1; 0 = none. While it is below 1 the figure is not a bound. */
    warmupSteps: whole('a number of warm-up steps', 0, 1_000_000).default(0),
    regime: z.enum(['token', 'type'], { error: 'Choose sampling by token or by type.' }).default('token'),
    seed: whole('a seed', 0, 2 ** 31 - 1).default(1),
    /** Validate every this many steps; 0 = only at the end. */
    evalEvery: whole('a validation interval', 0, 1_000_000).default(100),
    /** K of the validation bound. */
    evalSamples: whole('a number of validation samples', 1, 4096).default(64),
    /** Save a checkpoint to the server every this many steps; 0 = only on stop. */
    checkpointEvery: whole('a checkpoint interval', 0, 1_000_000).default(500),
    /**
     * State-space model only: the initial observation weights are multiplied by this (1 = as built). Absent (runs
     * stored before the setting existed, requests that leave it out) means 1 (shared/training/run-settings.ts); the
     * form, presets, grids, learnability check and command line send NEW_RUN_TRAINING_DEFAULTS.observationInitScale.
     */
    observationInitScale: z.number({ error: 'Give the observation init scale as a number.' })
      .min(OBSERVATION_INIT_SCALE_RANGE[0], `Give an observation init scale of at least ${OBSERVATION_INIT_SCALE_RANGE[0]}.`)
      .max(OBSERVATION_INIT_SCALE_RANGE[1], `Give an observation init scale of at most ${OBSERVATION_INIT_SCALE_RANGE[1]}.`)
      .optional(),
  })
  .strict();

export const splitSchema = z
  .object({
    seed: whole('a split seed', 0, 2 ** 31 - 1),
    shares: z
      .object({
        train: z.number().min(0, 'Give a train share from 0 to 1.').max(1, 'Give a train share from 0 to 1.'),
        validation: z.number().min(0, 'Give a validation share from 0 to 1.').max(1, 'Give a validation share from 0 to 1.'),
        test: z.number().min(0, 'Give a test share from 0 to 1.').max(1, 'Give a test share from 0 to 1.'),
      })
      .strict()
      .refine((s) => Math.abs(s.train + s.validation + s.test - 1) <= 1e-9, 'Make the train, validation and test shares add up to 1.')
      .refine((s) => s.train > 0, 'Give the training split a share above 0.'),
  })
  .strict();

const runName = safeText('Give the run a name.')
  .trim()
  .min(1, 'Give the run a name.')
  .max(120, 'Use a run name of at most 120 characters.');

const corpusId = z.string({ error: 'Choose a corpus.' }).uuid('Choose a corpus from this bench.');

const settingsOf = <M extends z.ZodType>(model: M) =>
  z.object({ model, training: trainingSchema, split: splitSchema.optional() }).strict();

export const ssmRunSettingsSchema = settingsOf(ssmModelSchema);
export const gruRunSettingsSchema = settingsOf(gruModelSchema);
export const ngramRunSettingsSchema = z
  .object({ model: ngramModelSchema, training: trainingSchema.partial().optional(), split: splitSchema.optional() })
  .strict();

/**
 * `POST /runs`. `split` is optional: without it the run uses the corpus's own split (seed and shares),
 * and the stored settings always carry the split that applies.
 */
export const createRunSchema = z.discriminatedUnion(
  'family',
  [
    z.object({ family: z.literal('ssm'), name: runName, corpusId, settings: ssmRunSettingsSchema, placement: runPlacementSchema.default('tab') }).strict(),
    z.object({ family: z.literal('gru'), name: runName, corpusId, settings: gruRunSettingsSchema, placement: runPlacementSchema.default('tab') }).strict(),
    z.object({ family: z.literal('ngram'), name: runName, corpusId, settings: ngramRunSettingsSchema, placement: runPlacementSchema.default('tab') }).strict(),
  ],
  { error: 'Choose a model family: ssm (state-space model), gru or ngram.' },
);
export type CreateRunRequest = z.input<typeof createRunSchema>;
export type SsmRunSettings = z.output<typeof ssmRunSettingsSchema>;
export type GruRunSettings = z.output<typeof gruRunSettingsSchema>;
export type NgramRunSettings = z.output<typeof ngramRunSettingsSchema>;
export type RunSettings = SsmRunSettings | GruRunSettings | NgramRunSettings;

const bits = (name: string) => z.number({ error: `Give ${name} as a number.` }).refine(Number.isFinite, `Give ${name} as a finite number.`);

/** Figures the trainer reports; a PATCH merges the fields it sends into the stored summary. */
export const runSummarySchema = z
  .object({
    lastBoundBitsPerChar: bits('the last bound').nullable(),
    /** False while the warm-up weight is below 1 (the figure is then not a bound). */
    lastIsBound: z.boolean(),
    bestValidationBitsPerChar: bits('the best validation bound').nullable(),
    bestValidationStep: whole('the step of the best validation bound', 0, 1e9).nullable(),
    /** Bits per word at the best validation step (beside its bits per character). */
    bestValidationBitsPerWord: bits('the best validation figure per word').nullable(),
    wordsPerSecond: z.number().min(0, 'Give words per second of 0 or more.').max(1e9),
    parameterCount: whole('a parameter count', 0, 1e10),
    backend: safeText('Name the backend.').trim().min(1).max(40, 'Name the backend in at most 40 characters.'),
    simd: z.boolean(),
    threads: whole('a thread count', 1, 256),
    /** The latest fresh samples, so a reloaded page can show them again. */
    lastSamples: z.array(safeText('Send each sample as text.').max(64, 'Keep each sample to 64 characters.'), { error: 'Send the samples as a list of words.' }).max(30, 'Send at most 30 samples.'),
  })
  .partial()
  .strict();
export type RunSummary = z.output<typeof runSummarySchema>;

export const updateRunSchema = z
  .object({
    name: runName.optional(),
    status: z.enum(RUN_STATUSES, { error: `Choose a status: ${RUN_STATUSES.join(', ')}.` }).optional(),
    statusReason: safeText('Say why in statusReason.').trim().max(500, 'Keep the reason to 500 characters.').nullable().optional(),
    stepsDone: whole('the steps done', 0, 1e9).optional(),
    summary: runSummarySchema.optional(),
  })
  .strict()
  .refine((b) => Object.values(b).some((v) => v !== undefined), { message: 'Send a status, a name, a summary or the steps done.', path: ['status'] })
  .refine((b) => b.status !== 'failed' || (b.statusReason ?? '').trim().length > 0, {
    message: 'Say why the run failed in statusReason (one sentence).',
    path: ['statusReason'],
  });
export type UpdateRunRequest = z.input<typeof updateRunSchema>;

export const archiveRunSchema = z.object({ archived: z.boolean({ error: 'Send archived: true or false.' }).default(true) }).strict();

const commaList = z
  .string()
  .optional()
  .transform((v) => (v ? v.split(',').map((s) => s.trim()).filter(Boolean) : []));

export const RUN_SORT_FIELDS = ['createdAt', 'updatedAt', 'name', 'status', 'stepsDone', 'bestBound'] as const;

export const listRunsQuerySchema = z.object({
  corpusId: z.string().uuid('Choose a corpus from this bench.').optional(),
  family: commaList.pipe(z.array(z.enum(RUN_FAMILIES, { error: `Filter by family ${RUN_FAMILIES.join(', ')}.` }))),
  status: commaList.pipe(z.array(z.enum(RUN_STATUSES, { error: `Filter by status ${RUN_STATUSES.join(', ')}.` }))),
  archived: z.enum(['false', 'true', 'all'], { error: 'Give archived as false, true or all.' }).default('false'),
  q: safeText('Send the search as text.').trim().max(120, 'Search for at most 120 characters.').optional(),
  sort: z.enum(RUN_SORT_FIELDS, { error: `Sort by ${RUN_SORT_FIELDS.join(', ')}.` }).default('createdAt'),
  dir: z.enum(['asc', 'desc'], { error: 'Give dir as asc or desc.' }).default('desc'),
  limit: z.coerce.number({ error: 'Give limit as a whole number.' }).int('Give limit as a whole number.').min(1, 'Give a limit of at least 1.').max(200, 'Give a limit of at most 200.').default(25),
  offset: z.coerce.number({ error: 'Give offset as a whole number.' }).int('Give offset as a whole number.').min(0, 'Give an offset of 0 or more.').default(0),
});
export type ListRunsQuery = z.input<typeof listRunsQuerySchema>;

export const metricPointSchema = z
  .object({
    series: z.string({ error: 'Name the series.' }).regex(METRIC_SERIES_PATTERN, 'Name the series in lower case letters, digits and _ (e.g. train_bound).'),
    step: whole('the step', 0, 1e9),
    value: z.number({ error: 'Give the value as a number.' }).refine(Number.isFinite, 'Give a finite value (not NaN or infinity).'),
  })
  .strict();

/** The size limit is checked before this schema (413); see MAX_METRIC_POINTS_PER_REQUEST. */
export const metricBatchSchema = z.object({ points: z.array(metricPointSchema, { error: 'Send points as a list.' }).min(1, 'Send at least one point.') }).strict();
export type MetricBatchRequest = z.input<typeof metricBatchSchema>;

export const metricsQuerySchema = z.object({
  series: commaList.pipe(z.array(z.string().regex(METRIC_SERIES_PATTERN, 'Name series in lower case letters, digits and _.'))),
  /** Only points with a larger step (for polling). */
  sinceStep: z.coerce.number().int('Give sinceStep as a whole number.').min(-1).default(-1),
  /** At most this many points per series (the earliest ones); `truncated` says when more exist. */
  limit: z.coerce.number().int().min(1, 'Give a limit of at least 1.').max(50_000, 'Give a limit of at most 50000.').default(10_000),
});

export const truncateMetricsQuerySchema = z.object({
  afterStep: z.coerce.number({ error: 'Give afterStep as a whole number.' }).int('Give afterStep as a whole number.').min(0, 'Give afterStep of 0 or more.'),
});

export const checkpointUploadQuerySchema = z.object({
  reason: z.enum(['auto', 'stop', 'manual'], { error: 'Give reason as auto, stop or manual.' }).default('manual'),
  /** The training or validation bound at this step in bits per character (leave out when unknown). */
  boundBitsPerChar: z.coerce.number({ error: 'Give boundBitsPerChar as a number.' }).refine(Number.isFinite, 'Give a finite bound.').refine((v) => v >= 0, 'Give a bound of 0 or more (bits per character are never negative).').optional(),
});

export interface RunDto {
  id: string;
  benchId: string;
  corpus: { id: string; name: string } | null;
  createdBy: { id: string; displayName: string } | null;
  name: string;
  family: RunFamily;
  settings: RunSettings;
  /** Characters without the end-of-word symbol (id i = alphabet[i-1]). */
  alphabet: string[];
  status: RunStatus;
  statusReason: string | null;
  summary: RunSummary;
  stepsDone: number;
  archived: boolean;
  checkpointCount: number;
  /** Whether the caller may control, upload to, archive and delete this run. */
  canControl: boolean;
  /** Where it trains: a browser tab, or the server's runners (see shared/api/runners.ts). */
  placement: RunPlacement;
  /** The runner holding it now (runner runs only). */
  runner: { id: string; name: string } | null;
  /** Latest progress of a runner run (null for tab runs and runs no runner has started). */
  live: RunLiveProgress | null;
  createdAt: string;
  updatedAt: string;
}

export interface RunPage {
  items: RunDto[];
  total: number;
}

/** `GET .../metrics`: one pair of arrays per series, in step order. */
export interface MetricSeriesPage {
  series: Record<string, { steps: number[]; values: number[] }>;
  truncated: boolean;
}

export interface CheckpointDto {
  id: string;
  runId: string;
  step: number;
  boundBitsPerChar: number | null;
  reason: CheckpointReason;
  formatVersion: number;
  byteSize: number;
  createdAt: string;
}

/** `GET /corpora/:corpusId/training-set`: every word with its count and split, in parallel arrays. */
export interface TrainingSet {
  alphabet: string[];
  words: string[];
  counts: number[];
  splits: ('train' | 'validation' | 'test')[];
}
