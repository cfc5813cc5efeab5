/**
 * The pre-run time estimate, measured on the user's own computer: a web worker trains the chosen configuration
 * for a few steps on synthetic words as long as a typical batch's longest word (`TrainerApi.probe`), and times
 * one set of live validation figures; the run's time is then steps × step time + measurements × measurement
 * time. Checkpoint uploads and other work on the computer are not included. The live view replaces the
 * estimate with the real pace after the first steps.
 */
import type { ProbeResult, TrainerSettings } from '../workers/trainer-api';

/** A word length and its weight in the batches (tokens when drawing by count, types when drawing each word once). */
export interface LengthWeight {
  length: number;
  weight: number;
}

/**
 * Expected length of the longest of `batchSize` independent draws from a length distribution: with F the
 * cumulative distribution, P(max ≤ L) = F(L)^B, so E[max] = Σ_L L·(F(L)^B − F(L−1)^B) (order statistics of
 * independent draws, closed form). A batch is padded to its longest word, so this sets the step's length.
 */
export function expectedLongestWord(lengths: readonly LengthWeight[], batchSize: number): number {
  const bins = lengths.filter((l) => l.weight > 0 && l.length > 0).sort((a, b) => a.length - b.length);
  const total = bins.reduce((s, l) => s + l.weight, 0);
  if (!(total > 0) || !(batchSize >= 1)) return 0;
  let below = 0;
  let expected = 0;
  for (const bin of bins) {
    const upTo = Math.min(1, (below + bin.weight) / total);
    expected += bin.length * (Math.pow(upTo, batchSize) - Math.pow(below / total, batchSize));
    below += bin.weight;
  }
  return expected;
}

/** Length weights from a corpus's length histogram for the run's sampling regime. */
export function lengthWeightsOf(histogram: readonly { length: number; types: number; tokens: number }[], regime: 'token' | 'type'): LengthWeight[] {
  return histogram.map((b) => ({ length: b.length, weight: regime === 'token' ? b.tokens : b.types }));
}

/** How many times a run measures its live validation figures: every `evalEvery` steps and after the last step. */
export function evaluationCount(steps: number, evalEvery: number): number {
  if (steps <= 0) return 0;
  if (evalEvery <= 0) return 1;
  return Math.floor(steps / evalEvery) + (steps % evalEvery === 0 ? 0 : 1);
}

/** Mean length of a word drawn from the length distribution (0 when empty). */
export function meanLength(lengths: readonly LengthWeight[]): number {
  const total = lengths.reduce((s, l) => s + Math.max(0, l.weight), 0);
  return total > 0 ? lengths.reduce((s, l) => s + l.length * Math.max(0, l.weight), 0) / total : 0;
}

export interface RunTimeEstimate {
  secondsPerStep: number;
  /** The one-off set-up of the run's fresh worker (first step and first measurement), included in the total. */
  setupSeconds: number;
  totalSeconds: number;
}

/** The run's time from a probe's timings (seconds): set-up + steps × step time + measurements × measurement time. */
export function estimateFromProbe(probe: Pick<ProbeResult, 'secondsPerStep' | 'secondsPerEvaluation' | 'setupSeconds'>,
                                  s: Pick<TrainerSettings, 'family' | 'steps' | 'evalEvery'>): RunTimeEstimate {
  const steps = s.family === 'ngram' ? 0 : s.steps;
  const evaluations = s.family === 'ngram' ? 1 : evaluationCount(steps, s.evalEvery);
  const setupSeconds = probe.setupSeconds;
  return {
    secondsPerStep: probe.secondsPerStep, setupSeconds,
    totalSeconds: setupSeconds + steps * probe.secondsPerStep + evaluations * probe.secondsPerEvaluation,
  };
}
