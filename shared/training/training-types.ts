/**
 * The plain-data shapes of one training job, shared by every place that trains: the browser worker
 * (src/app/workers), the command line (shared/cli) and the runner program (runner/). Structured-clone data only.
 */
import type { FlowKind } from '../model/flows/flow';
import type { TrainerErrorCode } from '../model/trainer-errors';

export type TrainerFamily = 'ssm' | 'gru' | 'ngram';

/** Everything a worker needs to build and train one run. */
export interface TrainerSettings {
  family: TrainerFamily;
  /** State (and noise) size d; also the GRU's state size. */
  stateSize: number;
  generativeFlow: FlowKind[];
  inferenceFlow: FlowKind[];
  /** Width of every flow's conditioning network. */
  flowHidden: number;
  /** Backward GRU width of the inference network. */
  encoderSize: number;
  /** Character embedding size (inference network / GRU input). */
  embeddingSize: number;
  /** Proposal MLP width. */
  proposalHidden: number;
  /** Observation MLP width; 0 = linear. */
  observationHidden: number;
  /** Importance samples K per word. */
  samples: number;
  batchSize: number;
  /** Total optimisation steps of the run (a resumed run continues up to this number). */
  steps: number;
  learningRate: number;
  /** Global-norm clipping, 0 = off. */
  clipNorm: number;
  /** Warm-up steps of the prior/posterior terms, 0 = none. */
  warmupSteps: number;
  /** State-space model: initial observation weights × this on a fresh start; absent = 1 (runs stored before it existed). */
  observationInitScale?: number;
  regime: 'token' | 'type';
  seed: number;
  /** n-gram order 1–6 (n-gram family only). */
  order: number;
  /** Fixed Kneser–Ney discount in (0, 1] (n-gram family only); absent or null = modified Kneser–Ney. */
  discount?: number | null;
  /** Validation figures, observation entropy, noise MI and samples every this many steps. */
  evalEvery: number;
}

/** The words the run trains on (and measures validation figures on), after normalisation and the split. */
export interface TrainingSet {
  /** Alphabet characters without EOW, sorted by code point. */
  alphabet: string[];
  train: { word: string; count: number }[];
  validation: { word: string; count: number }[];
}

/** Which compute the worker uses, reported after `init`. */
export interface EngineInfo {
  backend: string;
  simd: boolean;
  threads: number;
  parameterCount: number;
  /** Steps already done (non-zero after resuming from a checkpoint). */
  step: number;
}

/** Figures measured every `evalEvery` steps on the validation words (small budgets). */
export interface EvaluationFigures {
  step: number;
  /** Minus the validation IWAE bound (SSM, small K) or exact log-likelihood (GRU, n-gram), bits per character (lower is better). */
  validationBitsPerChar: number;
  validationBitsPerWord: number;
  /** Mean observation entropy H(p(.|h_t)) along posterior trajectories (SSM) or predictive entropy (GRU), bits. */
  observationEntropyBits: number | null;
  /** Mean noise mutual information I_t over steps and words (SSM only), bits. */
  noiseInformationBits: number | null;
  /** Fresh samples from the model. Generated words can coincide with real names or trademarks. */
  samples: string[];
}

export interface TrainingProgress {
  step: number;
  totalSteps: number;
  /** Training words processed per second over the last stretch. */
  wordsPerSecond: number;
  /** Seconds left at the current speed (null before the speed is known). */
  etaSeconds: number | null;
  /**
   * Minus the mean training bound of the steps since the previous message, bits per character (a cost: lower is
   * better); null when no step was taken (a closed-form model, or a run resumed from the checkpoint of its last step).
   */
  trainBitsPerChar: number | null;
  /** False while warm-up < 1: the training figure is then not a bound. */
  isBound: boolean;
  /** Present on the steps where the validation figures were measured. */
  evaluation?: EvaluationFigures;
}

export type TrainingOutcome =
  | { kind: 'completed'; step: number }
  | { kind: 'stopped'; step: number }
  | { kind: 'failed'; step: number; error: TrainerErrorShape };

/** An error as it crosses the worker boundary: plain data, the code from shared/model/trainer-errors.ts. */
export interface TrainerErrorShape {
  name: string;
  code: TrainerErrorCode;
  message: string;
}
