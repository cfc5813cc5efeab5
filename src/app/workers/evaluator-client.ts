/**
 * The page's side of the evaluation worker: a factory behind an InjectionToken (tests can swap in an in-thread
 * fake) that starts one module worker and wraps it with comlink as a typed `Remote<EvaluatorApi>`.
 */
import { InjectionToken } from '@angular/core';
import { releaseProxy, wrap, type Remote } from 'comlink';
import type { EvaluatorApi } from './evaluator-api';

export interface EvaluatorHandle {
  readonly api: Remote<EvaluatorApi>;
  /** Releases the comlink proxy and ends the worker (its tensors go with it). */
  close(): void;
}

export type EvaluatorFactory = () => EvaluatorHandle;

export function createWorkerEvaluator(): EvaluatorHandle {
  const worker = new Worker(new URL('./evaluator.worker', import.meta.url), { type: 'module', name: 'noisewright-evaluator' });
  const api = wrap<EvaluatorApi>(worker);
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

export const EVALUATOR_FACTORY = new InjectionToken<EvaluatorFactory>('Noisewright evaluation worker factory', {
  providedIn: 'root',
  factory: () => createWorkerEvaluator,
});
