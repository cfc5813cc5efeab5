/**
 * The page's side of a training worker: a factory (behind an InjectionToken, so tests can swap in an in-thread
 * fake over a MessageChannel) that starts one dedicated module worker per run and wraps it with comlink as a
 * typed `Remote<TrainerApi>`.
 */
import { InjectionToken } from '@angular/core';
import { TrainerErrorCode } from '../../../shared/model/trainer-errors';
import type { TrainerApi, TrainerErrorShape } from './trainer-api';
import { wrapWorker, type WorkerHandle } from './worker-handle';

export type TrainerHandle = WorkerHandle<TrainerApi>;

export type TrainerFactory = () => TrainerHandle;

/** Starts a real module worker running `trainer.worker.ts`. */
export function createWorkerTrainer(): TrainerHandle {
  return wrapWorker<TrainerApi>(new Worker(new URL('./trainer.worker', import.meta.url), { type: 'module', name: 'noisewright-trainer' }));
}

export const TRAINER_FACTORY = new InjectionToken<TrainerFactory>('Noisewright trainer worker factory', {
  providedIn: 'root',
  factory: () => createWorkerTrainer,
});

const KNOWN_CODES = new Set<string>(Object.values(TrainerErrorCode));

/** Turns an error thrown across the worker boundary (comlink: plain `{ name, message }`) into a typed shape. */
export function fromBoundaryError(error: unknown): TrainerErrorShape {
  const e = error as { name?: unknown; message?: unknown } | null;
  const name = typeof e?.name === 'string' ? e.name : 'Error';
  const message = typeof e?.message === 'string' && e.message
    ? e.message
    : 'The training worker stopped unexpectedly. Reload the page and resume from the last checkpoint.';
  const code = KNOWN_CODES.has(name) ? (name as TrainerErrorShape['code']) : TrainerErrorCode.Internal;
  return { name, code, message };
}
