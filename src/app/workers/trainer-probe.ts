/**
 * A timing probe of one run configuration on this computer: the same engine as a real run (run-engines.ts),
 * trained for a few steps on synthetic words of a given length (so the batch is as long as a typical batch of
 * the corpus) and, when the run measures validation figures, one measurement. The page turns the timings into
 * the pre-run estimate (src/app/runs/time-estimate.ts). No corpus data is involved.
 */
import { createRng } from '../../../shared/data/random';
import { TrainerError, TrainerErrorCode } from '../../../shared/model/trainer-errors';
import { createEngine, LIVE_EVAL } from '../../../shared/training/run-engines';
import type { ProbeRequest, ProbeResult, TrainingSet } from './trainer-api';

/** Untimed steps after the first (JIT and memory settle); then timed steps until the budget is spent. */
export const WARMUP_STEPS = 5;
export const PROBE_BUDGET_MS = 1500;
export const MIN_TIMED_STEPS = 3;
export const MAX_TIMED_STEPS = 8;

/**
 * Synthetic words over `alphabetSize` symbols (a, b, c, … then further code points), seeded: training words of
 * exactly `length` characters (every batch as long as a typical batch of the corpus) and validation words of
 * `validationLength` characters, as many as a live measurement uses.
 */
export function syntheticTrainingSet(alphabetSize: number, length: number, validationLength = length): TrainingSet {
  const chars = Array.from({ length: alphabetSize }, (_, i) => String.fromCodePoint(0x61 + i));
  const rng = createRng('time-probe');
  const words = (n: number) => Array.from({ length: LIVE_EVAL.words }, () => {
    let w = '';
    for (let i = 0; i < n; i++) w += chars[rng.int(alphabetSize)] as string;
    return { word: w, count: 1 };
  });
  return { alphabet: chars, train: words(length), validation: words(validationLength) };
}

const median = (v: number[]) => {
  const s = v.slice().sort((a, b) => a - b);
  return s.length % 2 ? (s[(s.length - 1) / 2] as number) : ((s[s.length / 2 - 1] as number) + (s[s.length / 2] as number)) / 2;
};

const seconds = (fn: () => unknown) => {
  const t0 = performance.now();
  fn();
  return (performance.now() - t0) / 1000;
};

export function runProbe(request: ProbeRequest, backend: string): ProbeResult {
  const { settings } = request;
  const alphabetSize = Math.round(request.alphabetSize);
  const wordLength = Math.round(request.wordLength);
  const validationLength = Math.round(request.validationWordLength ?? request.wordLength);
  const lengthOk = (n: number) => n >= 1 && n <= 200;
  if (!(alphabetSize >= 1 && alphabetSize <= 4000) || !lengthOk(wordLength) || !lengthOk(validationLength)) {
    throw new TrainerError(TrainerErrorCode.BadSettings,
      `The time probe needs an alphabet of 1–4000 characters and word lengths of 1–200; got ${request.alphabetSize}, ` +
        `${request.wordLength} and ${request.validationWordLength ?? request.wordLength}.`);
  }
  const started = performance.now();
  const engine = createEngine({ ...settings, steps: Number.MAX_SAFE_INTEGER }, syntheticTrainingSet(alphabetSize, wordLength, validationLength), null);
  try {
    let secondsPerStep = 0;
    let firstStep = 0;
    const times: number[] = [];
    if (!engine.closedForm) {
      firstStep = seconds(() => engine.step());
      for (let i = 0; i < WARMUP_STEPS; i++) engine.step();
      const t0 = performance.now();
      while (times.length < MAX_TIMED_STEPS && (times.length < MIN_TIMED_STEPS || performance.now() - t0 < PROBE_BUDGET_MS)) {
        times.push(seconds(() => engine.step()));
      }
      secondsPerStep = median(times); // robust to a garbage collection or another program's burst
    }
    const firstEvaluation = seconds(() => engine.evaluate());
    const secondsPerEvaluation = seconds(() => engine.evaluate());
    return {
      secondsPerStep, secondsPerEvaluation, timedSteps: times.length, wordLength, backend, parameterCount: engine.parameterCount,
      setupSeconds: Math.max(0, firstStep - secondsPerStep) + Math.max(0, firstEvaluation - secondsPerEvaluation),
      probeSeconds: (performance.now() - started) / 1000,
    };
  } finally {
    engine.dispose();
  }
}
