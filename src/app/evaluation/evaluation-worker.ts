import { DestroyRef, Injectable, inject } from '@angular/core';
import { proxy } from 'comlink';
import type { NoiseMap } from '../../../shared/eval/noise-map';
import type { EvaluationJobInput, EvaluationJobResult, EvaluationProgress, LiveCompletion, NoiseMapRequest } from '../workers/evaluator-api';
import { EVALUATOR_FACTORY, type EvaluatorHandle } from '../workers/evaluator-client';

/**
 * The evaluation page's worker (one per page, started on first use): full evaluations with progress, and live
 * completion and noise maps on the loaded checkpoint. Ended with the page.
 */
@Injectable()
export class EvaluationWorker {
  private readonly factory = inject(EVALUATOR_FACTORY);
  private handle: EvaluatorHandle | null = null;
  private opened: Promise<{ stateSize: number; alphabet: string[] }> | null = null;

  constructor() {
    inject(DestroyRef).onDestroy(() => this.close());
  }

  private api() {
    this.handle ??= this.factory();
    return this.handle.api;
  }

  evaluate(input: EvaluationJobInput, onProgress: (p: EvaluationProgress) => void): Promise<EvaluationJobResult> {
    return this.api().evaluate(input, proxy(onProgress));
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
