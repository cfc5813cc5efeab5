/**
 * The typed contract between the evaluation page and its worker (comlink). Framework-free: the worker, the
 * page and the Node parity test import it. Values are plain structured-clone data; progress comes back through a
 * comlink `proxy` callback.
 */
import type { Completion } from '../../../shared/eval/completion';
import type { NoiseMap } from '../../../shared/eval/noise-map';
import type { EvaluationJobInput, EvaluationJobResult } from './evaluator-job';

export type { EvaluationJobInput, EvaluationJobResult } from './evaluator-job';

/** How far an evaluation is: `done` of `total` figures, and the one being computed now. */
export interface EvaluationProgress { done: number; total: number; next: string }

export type LiveCompletion = Omit<Completion, 'particleStates' | 'particleWeights'>;

export interface NoiseMapRequest {
  /** The prefix whose filtered state the map starts from ('' = the model's initial state h_0). */
  prefix: string;
  dims: [number, number];
  /** Grid points per side and the noise range (−range … range) in each of the two dimensions. */
  steps: number;
  range: number;
  particles: number;
  seed: number;
}

export interface EvaluatorApi {
  /** Every figure of MODEL.md §7 for a checkpoint (the same computation as `npm run evaluate`). */
  evaluate(input: EvaluationJobInput, onProgress: (p: EvaluationProgress) => void | Promise<void>): Promise<EvaluationJobResult>;
  /** Loads a state-space checkpoint for live completion and noise maps (replaces any loaded one). */
  open(checkpoint: Uint8Array): Promise<{ stateSize: number; alphabet: string[] }>;
  /** Weighted continuations of a prefix (bootstrap particle filter, then prior sampling). */
  complete(prefix: string, opts: { particles: number; tMax: number; seed: number }): Promise<LiveCompletion>;
  /** The noise plane at the state after a prefix, mapped through the generative flow. */
  noiseMap(req: NoiseMapRequest): Promise<NoiseMap>;
  /** Frees the loaded model. */
  dispose(): Promise<void>;
}
