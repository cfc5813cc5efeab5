/**
 * The typed contract between the page and a training worker (one worker per run). Framework-free: the worker,
 * the page, the Node tests and the browser benchmark all import it. Values crossing the boundary are plain
 * structured-clone data; progress comes back through a comlink `proxy` callback and checkpoint bytes through
 * comlink `transfer`.
 */
import type { CheckpointDto } from '../../../shared/api/runs';

export type { TrainerErrorCode } from '../../../shared/model/trainer-errors';

export type {
  EngineInfo, EvaluationFigures, TrainerErrorShape, TrainerFamily, TrainerSettings, TrainingOutcome, TrainingProgress, TrainingSet,
} from '../../../shared/training/training-types';
import type {
  EngineInfo, TrainerSettings, TrainingOutcome, TrainingProgress, TrainingSet,
} from '../../../shared/training/training-types';

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
