/**
 * The pre-run time estimate against a measured run: the worker API's `probe` (a few steps on synthetic words of
 * the corpus's typical longest length) gives an estimate that must match the wall time of a real short run of
 * the same design on the demo corpus within a factor of 1.5. Runs under vitest in Node with the same engine as
 * the web worker (TF.js from shared/node: WASM, or CPU as fallback).
 */
import { readFileSync } from 'node:fs';
import { proxy } from 'comlink';
import { beforeAll, describe, expect, it } from 'vitest';
import { corpusStats } from '../../shared/data/corpus-stats';
import { buildAlphabet } from '../../shared/data/encode';
import { DEFAULT_SPLIT_SHARES, splitCorpus } from '../../shared/data/split';
import { initNodeBackend } from '../../shared/node/tf-node';
import { estimateFromProbe, evaluationCount, expectedLongestWord, lengthWeightsOf, meanLength } from '../../src/app/runs/time-estimate';
import type { TrainerSettings, TrainingSet } from '../../src/app/workers/trainer-api';
import { TrainerSession } from '../../src/app/workers/trainer-session';

function demoSet(): TrainingSet {
  const lines = readFileSync('datasets-demo/archipelago-places.tsv', 'utf8').trim().split('\n').slice(1);
  const words = lines.map((l) => { const [word, count] = l.split('\t'); return { word: word as string, count: Number(count) }; });
  const { parts } = splitCorpus(words, 1, DEFAULT_SPLIT_SHARES);
  return { alphabet: buildAlphabet(words.map((w) => w.word)).chars, train: parts.train, validation: parts.validation };
}

const DESIGN: TrainerSettings = {
  family: 'ssm', stateSize: 8, generativeFlow: ['coupling', 'diag'], inferenceFlow: ['diag'], flowHidden: 16,
  encoderSize: 24, embeddingSize: 8, proposalHidden: 16, observationHidden: 0, samples: 4, batchSize: 32,
  steps: 30, learningRate: 0.01, clipNorm: 5, warmupSteps: 0, regime: 'token', seed: 3, order: 3, evalEvery: 15,
};

let backend = '';
beforeAll(async () => { backend = await initNodeBackend('wasm'); });

describe('time estimate', () => {
  it('expected longest word of a batch: hand-worked order statistics', () => {
    // Lengths 1 and 2 equally likely, two draws: P(max = 1) = 1/4, so E[max] = 0.25·1 + 0.75·2 = 1.75.
    expect(expectedLongestWord([{ length: 1, weight: 1 }, { length: 2, weight: 1 }], 2)).toBeCloseTo(1.75, 12);
    // One draw: the mean length (3·1 + 5·3) / 4 = 4.5.
    expect(expectedLongestWord([{ length: 3, weight: 1 }, { length: 5, weight: 3 }], 1)).toBeCloseTo(4.5, 12);
    // The worker measures at every multiple of evalEvery and after the last step (trainer-session.ts loop).
    expect([evaluationCount(40, 20), evaluationCount(45, 20), evaluationCount(45, 0), evaluationCount(0, 20)]).toEqual([2, 3, 1, 0]);
  });

  it('a probe on this computer predicts a short real run within a factor of 1.5', { timeout: 90_000 }, async () => {
    const set = demoSet();
    const lengths = lengthWeightsOf(corpusStats(set.train).lengthHistogram, DESIGN.regime);
    const wordLength = Math.round(expectedLongestWord(lengths, DESIGN.batchSize));
    const validationWordLength = Math.round(meanLength(lengths));
    const report = async () => ({ backend, simd: false, threads: 1 });
    // Three rounds of probe-then-run, compared by the median ratio: a run of a few hundred milliseconds on a
    // machine shared with other test files is easily slowed by a burst of their work, which one round cannot tell
    // from a wrong estimate.
    const ratios: number[] = [];
    for (let round = 0; round < 3; round++) {
      const prober = new TrainerSession(report);
      const probe = await prober.probe({ settings: DESIGN, alphabetSize: set.alphabet.length, wordLength, validationWordLength });
      await prober.dispose();
      expect(probe.backend).toBe(backend);
      expect(probe.timedSteps).toBeGreaterThanOrEqual(2);
      expect(probe.secondsPerStep).toBeGreaterThan(0);
      // The probe ran first, so this process is warm when the run starts: the one-off set-up of a fresh worker
      // (which the estimate adds for the page) is left out here.
      const { totalSeconds, setupSeconds } = estimateFromProbe(probe, DESIGN);
      const estimate = totalSeconds - setupSeconds;

      const session = new TrainerSession(report);
      await session.init(DESIGN, set);
      const t0 = performance.now();
      const outcome = await session.start(proxy(() => {}));
      const measured = (performance.now() - t0) / 1000;
      await session.dispose();
      expect(outcome).toEqual({ kind: 'completed', step: DESIGN.steps });
      ratios.push(estimate / measured);
      process.stderr.write(`time estimate, round ${round + 1}: probe ${probe.secondsPerStep.toFixed(3)} s/step + ` +
        `${probe.secondsPerEvaluation.toFixed(3)} s/measurement, set-up ${setupSeconds.toFixed(2)} s, probe ${probe.probeSeconds.toFixed(1)} s ` +
        `(words of ${wordLength}) → ${estimate.toFixed(2)} s; measured run ${measured.toFixed(2)} s; ratio ${(estimate / measured).toFixed(2)}\n`);
    }
    const median = [...ratios].sort((x, y) => x - y)[1]!;
    // Target of the estimate: within a factor of 1.5 of the real run (product requirement, no source).
    expect(median).toBeGreaterThan(1 / 1.5);
    expect(median).toBeLessThan(1.5);
  });

  it('refuses a probe with an impossible word length and says what to fix', async () => {
    const session = new TrainerSession(async () => ({ backend, simd: false, threads: 1 }));
    await expect(session.probe({ settings: DESIGN, alphabetSize: 26, wordLength: 0 })).rejects.toThrow(/word lengths of 1–200/);
    await session.dispose();
  });
});
