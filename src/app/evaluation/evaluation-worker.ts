import { DestroyRef, Injectable, inject } from '@angular/core';
import { proxy } from 'comlink';
import type { NoiseMap } from '../../../shared/eval/noise-map';
import type { EvaluationJobInput, EvaluationJobResult, EvaluationProgress, LiveCompletion, NoiseMapRequest } from '../workers/evaluator-api';
import { EVALUATOR_FACTORY, type EvaluatorHandle } from '../workers/evaluator-client';

/** Thrown when the person cancelled the evaluation; nothing was stored. */
export class EvaluationCancelled extends Error {
  constructor() {
    super('The evaluation was cancelled; nothing was stored.');
    this.name = 'EvaluationCancelled';
  }
}

/**
 * The evaluation page's worker (one per page, started on first use): full evaluations with progress, and live
 * completion and noise maps on the loaded checkpoint. Ended with the page.
 */
@Injectable()
export class EvaluationWorker {
  private readonly factory = inject(EVALUATOR_FACTORY);
  private handle: EvaluatorHandle | null = null;
  private opened: Promise<{ stateSize: number; alphabet: string[] }> | null = null;
  private rejectCurrent: ((e: Error) => void) | null = null;
  private cancelAsked = false;

  constructor() {
    inject(DestroyRef).onDestroy(() => this.close());
  }

  private api() {
    this.handle ??= this.factory();
    return this.handle.api;
  }

  /**
   * A full evaluation. `cancel()` ends it at once (the worker is terminated) and the promise rejects with
   * `EvaluationCancelled`; a cancel asked before the worker started makes this call reject right away.
   */
  async evaluate(input: EvaluationJobInput, onProgress: (p: EvaluationProgress) => void): Promise<EvaluationJobResult> {
    if (this.cancelAsked) {
      this.cancelAsked = false;
      throw new EvaluationCancelled();
    }
    const cancelled = new Promise<never>((_, reject) => { this.rejectCurrent = reject; });
    try {
      return await Promise.race([this.api().evaluate(input, proxy(onProgress)), cancelled]);
    } finally {
      this.rejectCurrent = null;
    }
  }

  /** Stops the evaluation under way (or the one about to start): terminates the worker, which starts afresh next time. */
  cancel(): void {
    const reject = this.rejectCurrent;
    this.rejectCurrent = null;
    if (!reject) {
      this.cancelAsked = true;
      return;
    }
    this.close();
    reject(new EvaluationCancelled());
  }

  /** Forgets a cancel that came too late to stop anything (e.g. while the figures were being saved). */
  forgetCancel(): void {
    this.cancelAsked = false;
  }

  /** Loads the checkpoint for completion and noise maps (once per page). */
  open(load: () => Promise<Uint8Array>): Promise<{ stateSize: number; alphabet: string[] }> {
    this.opened ??= load().then((bytes) => this.api().open(bytes)).catch((e: unknown) => {
      this.opened = null;
      throw e;
    });
    return this.opened;
  }

  complete(prefix: string, opts: { particles: number; tMax: number; seed: number }): Promise<LiveCompletion> {
    return this.api().complete(prefix, opts);
  }

  noiseMap(req: NoiseMapRequest): Promise<NoiseMap> {
    return this.api().noiseMap(req);
  }

  close(): void {
    this.handle?.close();
    this.handle = null;
    this.opened = null;
  }
}
