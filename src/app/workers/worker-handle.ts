/**
 * A started web worker wrapped with comlink as a typed `Remote<T>`, with one way to end it. The
 * `new Worker(new URL('./x.worker', import.meta.url))` call stays in each client so the bundler finds the worker.
 */
import { releaseProxy, wrap, type Remote } from 'comlink';

export interface WorkerHandle<T> {
  readonly api: Remote<T>;
  /** Releases the comlink proxy and ends the worker (its tensors go with it). */
  close(): void;
}

export function wrapWorker<T>(worker: Worker): WorkerHandle<T> {
  const api = wrap<T>(worker);
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
