/**
 * The real `EvaluatorApi`: the worker entry (`evaluator.worker.ts`) exposes an instance with comlink; the Node
 * parity test exposes it over an in-thread MessageChannel. Errors cross the boundary as plain `{ name, message }`.
 */
import type { Alphabet } from '../../../shared/data/encode';
import { alphabetFromChars } from '../../../shared/data/encode';
import { completePrefix } from '../../../shared/eval/completion';
import { noiseMap, type NoiseMap } from '../../../shared/eval/noise-map';
import { decodeCheckpoint } from '../../../shared/model/checkpoint';
import type { StateSpaceModel } from '../../../shared/model/ssm';
import { modelFromCheckpoint } from '../../../shared/model/ssm-checkpoint';
import type { EvaluationProgress, EvaluatorApi, LiveCompletion, NoiseMapRequest } from './evaluator-api';
import { runEvaluationJob, type EvaluationJobInput, type EvaluationJobResult } from './evaluator-job';

/** What the worker entry knows about the compute it set up. */
export interface EvaluatorBackend { backend: string; simd: boolean; threads: number }

function boundaryError(error: unknown): Error {
  const e = new Error(error instanceof Error && error.message ? error.message : 'The evaluation failed unexpectedly; reload the page and try again.');
  e.name = 'EvaluationError';
  return e;
}

export class EvaluatorSession implements EvaluatorApi {
  private model: StateSpaceModel | null = null;
  private alphabet: Alphabet | null = null;

  constructor(private readonly backend: () => Promise<EvaluatorBackend>) {}

  async evaluate(input: EvaluationJobInput, onProgress: (p: EvaluationProgress) => void | Promise<void>): Promise<EvaluationJobResult> {
    try {
      await this.backend();
      // The callback posts a message at once; the page sees it while the worker keeps computing. The last one is
      // awaited so that every progress message has arrived before `evaluate` resolves.
      let last: EvaluationProgress = { done: 0, total: 1, next: 'start' };
      const result = runEvaluationJob(input, (done, total, next) => {
        last = { done, total, next };
        void onProgress(last);
      });
      await onProgress({ done: last.total, total: last.total, next: 'done' });
      return result;
    } catch (e) {
      throw boundaryError(e);
    }
  }

  async open(checkpoint: Uint8Array): Promise<{ stateSize: number; alphabet: string[] }> {
    try {
      await this.backend();
      const ck = decodeCheckpoint(checkpoint);
      if (ck.family !== 'ssm') throw new Error('Completion and the noise map need a state-space model checkpoint.');
      const model = modelFromCheckpoint(ck);
      this.model?.dispose();
      this.model = model;
      this.alphabet = alphabetFromChars(ck.alphabet);
      const h0 = model.initialState();
      const stateSize = h0.shape[0] as number;
      h0.dispose();
      return { stateSize, alphabet: ck.alphabet.slice() };
    } catch (e) {
      throw boundaryError(e);
    }
  }

  private loaded(): { model: StateSpaceModel; alphabet: Alphabet } {
    if (!this.model || !this.alphabet) throw new Error('Open a checkpoint before asking for completions or a noise map.');
    return { model: this.model, alphabet: this.alphabet };
  }

  async complete(prefix: string, opts: { particles: number; tMax: number; seed: number }): Promise<LiveCompletion> {
    try {
      const { model, alphabet } = this.loaded();
      const { particleStates: _s, particleWeights: _w, ...c } = completePrefix(model, alphabet, prefix, opts);
      return c;
    } catch (e) {
      throw boundaryError(e);
    }
  }

  async noiseMap(req: NoiseMapRequest): Promise<NoiseMap> {
    try {
      const { model, alphabet } = this.loaded();
      let from: number[];
      if (req.prefix === '') {
        const h0 = model.initialState();
        from = Array.from(h0.dataSync());
        h0.dispose();
      } else {
        from = completePrefix(model, alphabet, req.prefix, { particles: req.particles, tMax: Array.from(req.prefix).length + 1, seed: req.seed }).meanState;
      }
      return noiseMap(model, alphabet, from, { mode: 'grid', dims: req.dims, steps: req.steps, range: req.range });
    } catch (e) {
      throw boundaryError(e);
    }
  }

  async dispose(): Promise<void> {
    this.model?.dispose();
    this.model = null;
    this.alphabet = null;
  }
}
