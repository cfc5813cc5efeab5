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
}
