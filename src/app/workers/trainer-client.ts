/**
 * The page's side of a training worker: a factory (behind an InjectionToken, so tests can swap in an in-thread
 * fake over a MessageChannel) that starts one dedicated module worker per run and wraps it with comlink as a
 * typed `Remote<TrainerApi>`.
 */
import { InjectionToken } from '@angular/core';
import { releaseProxy, wrap, type Remote } from 'comlink';
import { TrainerErrorCode } from '../../../shared/model/trainer-errors';
import type { TrainerApi, TrainerErrorShape } from './trainer-api';

export interface TrainerHandle {
  readonly api: Remote<TrainerApi>;
  /** Releases the comlink proxy and ends the worker (its tensors go with it). */
  close(): void;
}

export type TrainerFactory = () => TrainerHandle;

/** Starts a real module worker running `trainer.worker.ts`. */
export function createWorkerTrainer(): TrainerHandle {
  const worker = new Worker(new URL('./trainer.worker', import.meta.url), { type: 'module', name: 'noisewright-trainer' });
  const api = wrap<TrainerApi>(worker);
  let closed = false;
  return {
    api,
    close() {
      if (closed) return;
      closed = true;
      api[releaseProxy]();
      worker.terminate();
    },
  };
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
