/** Timed cases of `npm run bench`: training steps of the SSM and the GRU baseline, and vocabulary scoring. */
import * as tf from '@tensorflow/tfjs-core';
import type { Alphabet, WordCount } from '../shared/data/encode';
import { encodeBatch, encodeWord } from '../shared/data/encode';
import { createBatcher } from '../shared/data/batcher';
import { createRng } from '../shared/data/random';
import { sharedTrajectoryLogProbs } from '../shared/eval/shared-trajectories';
import type { FlowSpec } from '../shared/model/flows/flow';
import { GruLanguageModel, GruTrainer } from '../shared/model/gru-lm';
import { StateSpaceModel } from '../shared/model/ssm';
import { defaultSsmSettings } from '../shared/model/ssm-settings';
import { SsmTrainer } from '../shared/model/trainer';

export interface StepCase {
  name: string;
  model: 'ssm' | 'gru';
  backend: string;
  stateSize: number;
  k: number;
  batchSize: number;
  steps: number;
  parameterCount: number;
  stepsPerSecond: number;
  wordsPerSecond: number;
  msPerStep: number;
  /** Process CPU time per step (user + system), ms: less sensitive than wall time to other work on the machine. */
  cpuMsPerStep: number;
  /** Kernels dispatched by one training step (tf.profile). */
  opsPerStep: number;
  /** Tensors alive after the timed steps minus before (0 = no leak). */
  tensorDelta: number;
}

export interface SsmCaseSettings {
  name: string;
  stateSize: number;
  k: number;
  batchSize: number;
  generativeFlow: FlowSpec[];
  inferenceFlow: FlowSpec[];
  encoderSize: number;
}

async function opsOf(fn: () => void): Promise<number> {
  const info = await tf.profile(() => { fn(); });
  return info.kernels.length;
}

/** Wall seconds and CPU milliseconds per step of `steps` calls. */
function time(steps: number, fn: () => void): { seconds: number; cpuMsPerStep: number } {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  for (let i = 0; i < steps; i++) fn();
  const seconds = (performance.now() - t0) / 1000;
  const c = process.cpuUsage(c0);
  return { seconds, cpuMsPerStep: (c.user + c.system) / 1000 / steps };
}

export async function ssmStepCase(c: SsmCaseSettings, words: WordCount[], alphabet: Alphabet, steps: number, warmup: number): Promise<StepCase> {
  const model = new StateSpaceModel(defaultSsmSettings(alphabet.size, {
    stateSize: c.stateSize, generativeFlow: c.generativeFlow, inferenceFlow: c.inferenceFlow, encoderSize: c.encoderSize,
  }), 1);
  const trainer = new SsmTrainer(model, { learningRate: 0.01, samples: c.k, clipNorm: 5 });
  const batcher = createBatcher(words, { batchSize: c.batchSize, regime: 'token', rng: createRng(1) });
  const batches = Array.from({ length: steps + warmup + 1 }, () => encodeBatch(batcher.next(), alphabet));
  let i = 0;
  const step = () => { trainer.step(batches[i++ % batches.length]!); };
  for (let w = 0; w < warmup; w++) step();
  const before = tf.memory().numTensors;
  const { seconds, cpuMsPerStep } = time(steps, step);
  const tensorDelta = tf.memory().numTensors - before;
  const ops = await opsOf(step);
  const out = {
    name: c.name, model: 'ssm' as const, backend: tf.getBackend(), stateSize: c.stateSize, k: c.k, batchSize: c.batchSize, steps,
    parameterCount: model.parameterCount, stepsPerSecond: steps / seconds, wordsPerSecond: (steps * c.batchSize) / seconds,
    msPerStep: (1000 * seconds) / steps, cpuMsPerStep, opsPerStep: ops, tensorDelta,
  };
  trainer.dispose();
  model.dispose();
  return out;
}

export async function gruStepCase(name: string, stateSize: number, batchSize: number, words: WordCount[], alphabet: Alphabet,
                                  steps: number, warmup: number): Promise<StepCase> {
  const model = new GruLanguageModel({ vocabSize: alphabet.size, stateSize, embeddingSize: 16, observationHidden: 0 }, 1);
  const trainer = new GruTrainer(model, { learningRate: 0.01, clipNorm: 5 });
  const batcher = createBatcher(words, { batchSize, regime: 'token', rng: createRng(2) });
  const batches = Array.from({ length: steps + warmup + 1 }, () => encodeBatch(batcher.next(), alphabet));
  let i = 0;
  const step = () => { trainer.step(batches[i++ % batches.length]!); };
  for (let w = 0; w < warmup; w++) step();
  const before = tf.memory().numTensors;
  const { seconds, cpuMsPerStep } = time(steps, step);
  const tensorDelta = tf.memory().numTensors - before;
  const ops = await opsOf(step);
  const out = {
    name, model: 'gru' as const, backend: tf.getBackend(), stateSize, k: 0, batchSize, steps, parameterCount: model.parameterCount,
    stepsPerSecond: steps / seconds, wordsPerSecond: (steps * batchSize) / seconds, msPerStep: (1000 * seconds) / steps,
    cpuMsPerStep, opsPerStep: ops, tensorDelta,
  };
  trainer.dispose();
  model.dispose();
  return out;
}

export interface ScoringCase {
  words: number;
  trajectories: number;
  tMax: number;
  stateSize: number;
  seconds: number;
  /** Process CPU seconds (user + system) of the pass. */
  cpuSeconds: number;
  wordsPerSecond: number;
}

/** Time to score a whole vocabulary with S shared prior trajectories (one pass). */
export function scoringCase(vocabulary: string[], alphabet: Alphabet, trajectories: number, stateSize: number): ScoringCase {
  const model = new StateSpaceModel(defaultSsmSettings(alphabet.size, {
    stateSize, generativeFlow: [{ kind: 'coupling' }, { kind: 'coupling' }, { kind: 'diag' }],
  }), 3);
  const seqs = vocabulary.map((w) => encodeWord(w, alphabet));
  const tMax = seqs.reduce((m, s) => Math.max(m, s.length), 1);
  sharedTrajectoryLogProbs(model, seqs.slice(0, 64), { samples: 16, seed: 1 }); // warm-up
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const lp = sharedTrajectoryLogProbs(model, seqs, { samples: trajectories, seed: 2 });
  const seconds = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(c0);
  model.dispose();
  if (lp.some((x) => !Number.isFinite(x))) throw new Error('Scoring produced a non-finite log-probability.');
  return {
    words: vocabulary.length, trajectories, tMax, stateSize, seconds, cpuSeconds: (cpu.user + cpu.system) / 1e6,
    wordsPerSecond: vocabulary.length / seconds,
  };
}
