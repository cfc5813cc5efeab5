/**
 * The one home of the model-settings rules: families, flow kinds, limits, the Kneser–Ney discount range and
 * the defaults of a new run. The API schemas (shared/api/runs.ts), the checkpoint reader (checkpoint.ts), the
 * model validation (ssm-settings.ts, ngram-kn.ts), the command line (shared/cli/train-options.ts) and the
 * new-run form (src/app/runs/run-form.ts) all derive from here; settings-rules.spec.ts checks they agree.
 * Plain constants only: no TF.js, no zod, so every page and the server can import it.
 */

export const MODEL_FAMILIES = ['ssm', 'gru', 'ngram'] as const;
export type ModelFamilyName = (typeof MODEL_FAMILIES)[number];

export const FLOW_KIND_NAMES = ['shift', 'diag', 'tril', 'coupling'] as const;
export type FlowKindName = (typeof FLOW_KIND_NAMES)[number];

/** Inclusive [min, max] of every whole-number model setting. */
export const SETTING_LIMITS = {
  stateSize: [1, 256],
  vocabSize: [2, 4096],
  flowHidden: [1, 1024],
  observationHidden: [0, 1024],
  embeddingSize: [1, 512],
  encoderSize: [1, 1024],
  proposalHidden: [1, 1024],
  /** Importance samples K per word during training. */
  samples: [1, 1024],
  /** Layers of one flow stack. */
  flowLayers: [1, 8],
  ngramOrder: [1, 6],
} as const satisfies Record<string, readonly [number, number]>;
export type LimitedSetting = keyof typeof SETTING_LIMITS;

/** A fixed Kneser–Ney discount (original interpolated KN): 0 < D ≤ 1. */
export const KN_DISCOUNT_RANGE = { above: 0, atMost: 1, text: '(0, 1]' } as const;
export const isKnDiscount = (d: number): boolean => Number.isFinite(d) && d > KN_DISCOUNT_RANGE.above && d <= KN_DISCOUNT_RANGE.atMost;

export const withinLimit = (key: LimitedSetting, n: number): boolean =>
  Number.isInteger(n) && n >= SETTING_LIMITS[key][0] && n <= SETTING_LIMITS[key][1];

/**
 * Model settings of a new run (form and command line). `flowHidden` 16 rather than 32: as good or better at every
 * budget measured, without extra step time (docs/RESULTS.md, "Training recipe study").
 */
export const NEW_RUN_MODEL_DEFAULTS = {
  stateSize: 8,
  generativeFlow: ['coupling', 'coupling', 'diag'] as FlowKindName[],
  inferenceFlow: ['diag'] as FlowKindName[],
  flowHidden: 16,
  observationHidden: 0,
  embeddingSize: 16,
  encoderSize: 64,
  proposalHidden: 32,
  samples: 8,
  ngramOrder: 3,
} as const;

/**
 * Initial observation weights of a fresh state-space model are multiplied by this training setting (1 = as
 * built); a sharper emission at the start lets the noise carry the characters (docs/RESULTS.md, "Training
 * recipe study"). Inclusive range; runs stored before the setting existed train with 1.
 */
export const OBSERVATION_INIT_SCALE_RANGE = [0.1, 20] as const;
export const isObservationInitScale = (x: number): boolean =>
  Number.isFinite(x) && x >= OBSERVATION_INIT_SCALE_RANGE[0] && x <= OBSERVATION_INIT_SCALE_RANGE[1];

/**
 * Training settings of a new run: the form, the grids, the learnability check and the command line start
 * from these (the presets change only what they name).
 */
export const NEW_RUN_TRAINING_DEFAULTS = {
  steps: 1000,
  batchSize: 64,
  learningRate: 0.01,
  clipNorm: 5,
  warmupSteps: 0,
  observationInitScale: 3,
} as const;
