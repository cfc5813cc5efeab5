/**
 * The page's side of the evaluation worker: a factory behind an InjectionToken (tests can swap in an in-thread
 * fake) that starts one module worker and wraps it with comlink as a typed `Remote<EvaluatorApi>`.
 */
import { InjectionToken } from '@angular/core';
import type { EvaluatorApi } from './evaluator-api';
import { wrapWorker, type WorkerHandle } from './worker-handle';

export type EvaluatorHandle = WorkerHandle<EvaluatorApi>;

export type EvaluatorFactory = () => EvaluatorHandle;

export function createWorkerEvaluator(): EvaluatorHandle {
  return wrapWorker<EvaluatorApi>(new Worker(new URL('./evaluator.worker', import.meta.url), { type: 'module', name: 'noisewright-evaluator' }));
}

export const EVALUATOR_FACTORY = new InjectionToken<EvaluatorFactory>('Noisewright evaluation worker factory', {
  providedIn: 'root',
  factory: () => createWorkerEvaluator,
});
