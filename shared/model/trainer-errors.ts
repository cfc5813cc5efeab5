/**
 * Error codes of browser/worker training (the worker sends errors to the page as plain `{ name, code, message }`).
 * `toTrainerError` turns anything thrown in the training code into that shape with a sentence that says what to do.
 */
import { CheckpointError } from './checkpoint';
import { NonFiniteLossError } from './trainer';

export const TrainerErrorCode = {
  /** The loss or the gradient became NaN or infinite; the weights were rolled back to the last good step. */
  NonFiniteLoss: 'NON_FINITE_LOSS',
  /** The checkpoint bytes could not be read or do not fit the run. */
  BadCheckpoint: 'BAD_CHECKPOINT',
  /** The run settings or the training set are unusable. */
  BadSettings: 'BAD_SETTINGS',
  /** A call came in the wrong order (e.g. `start` before `init`). */
  WrongState: 'WRONG_STATE',
  /** The worker could not send a checkpoint to the server (network, sign-in or a refusal; the message says which). */
  UploadFailed: 'UPLOAD_FAILED',
  /** Anything else (a fault in the training code or the backend). */
  Internal: 'TRAINER_INTERNAL',
} as const;

export type TrainerErrorCode = (typeof TrainerErrorCode)[keyof typeof TrainerErrorCode];

export class TrainerError extends Error {
  override readonly name = 'TrainerError';
  constructor(readonly code: TrainerErrorCode, message: string) {
    super(message);
  }
}

export function toTrainerError(error: unknown): { name: string; code: TrainerErrorCode; message: string } {
  if (error instanceof TrainerError) return { name: error.name, code: error.code, message: error.message };
  if (error instanceof NonFiniteLossError) return { name: error.name, code: TrainerErrorCode.NonFiniteLoss, message: error.message };
  if (error instanceof CheckpointError) return { name: error.name, code: TrainerErrorCode.BadCheckpoint, message: error.message };
  const e = error instanceof Error ? error : new Error(String(error));
  return {
    name: e.name || 'Error',
    code: TrainerErrorCode.Internal,
    message: `Training failed inside the worker: ${e.message || 'unknown error'}. Reload the page and resume from the last checkpoint.`,
  };
}
