/**
 * The typed contract between the page and a training worker (one worker per run). Framework-free: the worker,
 * the page, the Node tests and the browser benchmark all import it. Values crossing the boundary are plain
 * structured-clone data; progress comes back through a comlink `proxy` callback and checkpoint bytes through
 * comlink `transfer`.
 */
import type { CheckpointDto } from '../../../shared/api/runs';
import type { FlowKind } from '../../../shared/model/flows/flow';
import type { TrainerErrorCode } from '../../../shared/model/trainer-errors';

export type { TrainerErrorCode } from '../../../shared/model/trainer-errors';

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
  regime: 'token' | 'type';
  seed: number;
  /** n-gram order 1–6 (n-gram family only). */
  order: number;
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
  /** Minus the mean training bound of the steps since the previous message, bits per character (a cost: lower is better). */
  trainBitsPerChar: number;
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

/** Where and as whom the worker sends a checkpoint: the absolute upload URL (with its query) and the bearer token. */
export interface CheckpointUploadTarget {
  url: string;
  token: string | null;
}

/** The server's answer to a checkpoint upload: the stored checkpoint's description. */
export type CheckpointUploadAnswer = CheckpointDto;

/** What `probe` times: a run configuration on synthetic words of a typical batch's longest length. */
export interface ProbeRequest {
  settings: TrainerSettings;
  /** Characters of the corpus's alphabet (without EOW). */
  alphabetSize: number;
  /** Characters of every synthetic training word (a typical batch's longest word; see src/app/runs/time-estimate.ts). */
  wordLength: number;
  /** Characters of the synthetic validation words (default: `wordLength`). */
  validationWordLength?: number;
}

/** Timings of a probe on this computer, seconds. */
export interface ProbeResult {
  /** Median wall time of one training step after a few untimed steps (0 for the n-gram). */
  secondsPerStep: number;
  /** Wall time of one set of live validation figures (measured every `evalEvery` steps), after a first untimed one. */
  secondsPerEvaluation: number;
  /** One-off extra time of a fresh worker: the first step's and the first measurement's excess over the later ones. */
  setupSeconds: number;
  timedSteps: number;
  wordLength: number;
  backend: string;
  parameterCount: number;
  /** Wall time of the whole probe, set-up included. */
  probeSeconds: number;
}

/** Called from the worker through a comlink proxy (so it returns a promise on the worker's side). */
export type ProgressCallback = (progress: TrainingProgress) => void | Promise<void>;

export interface TrainerApi {
  /** Builds the model (fresh from the seed, or from checkpoint bytes) and the backend; call once. */
  init(settings: TrainerSettings, trainingSet: TrainingSet, checkpoint?: Uint8Array): Promise<EngineInfo>;
  /** Trains until `settings.steps`, a stop, or a failure; resolves with how it ended. Progress via the callback. */
  start(onProgress: ProgressCallback): Promise<TrainingOutcome>;
  pause(): Promise<void>;
  resume(): Promise<void>;
  /** Ends training after the current step; `start` then resolves with `stopped`. */
  stop(): Promise<void>;
  /** The current weights and optimiser state as checkpoint bytes (the last good step after a failure). */
  checkpoint(): Promise<Uint8Array>;
  /**
   * Encodes the current checkpoint and POSTs it to the server from the worker, so the page's main thread does
   * no work for it; resolves with the server's answer (the stored checkpoint's description).
   */
  uploadCheckpoint(target: CheckpointUploadTarget): Promise<CheckpointUploadAnswer>;
  /** `n` fresh samples from the current model. */
  samples(n: number): Promise<string[]>;
  /** Frees the model's tensors. */
  dispose(): Promise<void>;
  /**
   * Times a few steps (and one live measurement) of `request.settings` on synthetic words, with a model of its
   * own that is freed afterwards; independent of `init`. Used for the estimate on the new-run form.
   */
  probe(request: ProbeRequest): Promise<ProbeResult>;
}
