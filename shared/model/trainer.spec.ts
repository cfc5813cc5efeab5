import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet, encodeBatch } from '../data/encode';
import { initNodeBackend } from '../node/tf-node';
import { iwaeBound } from './bounds';
import { StateSpaceModel } from './ssm';
import { defaultSsmSettings } from './ssm-settings';
import { clipByGlobalNorm, globalNorm, NonFiniteLossError, SsmTrainer } from './trainer';

beforeAll(async () => {
  await initNodeBackend();
});

// A tiny synthetic corpus with strong regularities (alternating letters).
const words = ['abab', 'ab', 'ababab', 'ba', 'baba', 'bababa', 'abba', 'aba'];
const alphabet = buildAlphabet(words);
const batch = encodeBatch(words, alphabet);
const settings = defaultSsmSettings(alphabet.size, {
  stateSize: 4,
  flowHidden: 12,
  embeddingSize: 6,
  encoderSize: 12,
  proposalHidden: 12,
});

function meanBound(model: StateSpaceModel, seed: number): number {
  return tf.tidy(() => tf.mean(iwaeBound(model.logWeights(batch, 32, { seed }).logW)).dataSync()[0] as number);
}

describe('SsmTrainer', () => {
  it('improves the bound on a tiny corpus within 60 steps', () => {
    const model = new StateSpaceModel(settings, 'train');
    const trainer = new SsmTrainer(model, { learningRate: 0.02, samples: 4, clipNorm: 10 });
    const before = meanBound(model, 99);
    let last = trainer.step(batch);
    for (let i = 1; i < 60; i++) last = trainer.step(batch);
    const after = meanBound(model, 99);
    expect(last.step).toBe(60);
    expect(last.isBound).toBe(true);
    expect(Number.isFinite(last.boundBitsPerChar)).toBe(true);
    // Improvement, not a value: at least 1 nat per word better on the training words.
    expect(after).toBeGreaterThan(before + 1);
    trainer.dispose();
    model.dispose();
  });

  it('keeps the number of tensors constant across steps', () => {
    const model = new StateSpaceModel(settings, 'memory');
    const trainer = new SsmTrainer(model, { learningRate: 0.01, samples: 2, clipNorm: 1 });
    trainer.step(batch); // the first step creates the roll-back copies kept between steps
    const before = tf.memory().numTensors;
    trainer.step(batch);
    trainer.step(batch);
    expect(tf.memory().numTensors).toBe(before);
    trainer.dispose();
    model.dispose();
  });

  it('keeps the number of tensors and bytes constant over 1,000 steps, and frees them all on dispose', () => {
    const tiny = defaultSsmSettings(alphabet.size, { stateSize: 2, flowHidden: 3, embeddingSize: 2, encoderSize: 3, proposalHidden: 3,
      generativeFlow: [{ kind: 'coupling' }, { kind: 'diag' }] });
    const start = tf.memory().numTensors;
    const model = new StateSpaceModel(tiny, 'memory-1000');
    const trainer = new SsmTrainer(model, { learningRate: 0.01, samples: 2, clipNorm: 1 });
    const short = encodeBatch(['ab', 'ba'], alphabet);
    trainer.step(short);
    const before = tf.memory();
    for (let i = 0; i < 1000; i++) trainer.step(short);
    expect(trainer.stepCount).toBe(1001);
    expect(tf.memory().numTensors).toBe(before.numTensors);
    expect(tf.memory().numBytes).toBe(before.numBytes);
    trainer.dispose();
    model.dispose();
    expect(tf.memory().numTensors).toBe(start);
  }, 300_000);

  it('reports a warm-up figure as "not a bound" until the weight reaches 1', () => {
    const model = new StateSpaceModel(settings, 'warm');
    const trainer = new SsmTrainer(model, { learningRate: 0.01, samples: 2, clipNorm: 0, warmupSteps: 3 });
    const r = [trainer.step(batch), trainer.step(batch), trainer.step(batch)];
    expect(r.map((x) => x.isBound)).toEqual([false, false, true]);
    expect(r.map((x) => x.klWeight)).toEqual([1 / 3, 2 / 3, 1]);
    trainer.dispose();
    model.dispose();
  });

  it('clips by global norm (closed form: 3-4-12 has norm 13)', () => {
    tf.tidy(() => {
      const grads = [tf.tensor1d([3, 4]), tf.tensor1d([12])];
      expect(globalNorm(grads).dataSync()[0]).toBeCloseTo(13, 5);
      const clipped = clipByGlobalNorm(grads, 13, 1);
      expect(Array.from(clipped[0]?.dataSync() ?? [])).toEqual([expect.closeTo(3 / 13, 6), expect.closeTo(4 / 13, 6)]);
      expect(globalNorm(clipped).dataSync()[0]).toBeCloseTo(1, 5);
      expect(clipByGlobalNorm(grads, 13, 20)).toBe(grads);
      expect(clipByGlobalNorm(grads, 13, 0)).toBe(grads);
    });
  });

  it('stops on a non-finite loss and rolls the weights back to the last good step', () => {
    const model = new StateSpaceModel(settings, 'explode');
    // A learning rate this large makes Adam move every weight by about 1e30: the next loss overflows.
    const trainer = new SsmTrainer(model, { learningRate: 1e30, samples: 2, clipNorm: 0 });
    let weightsBeforeLastGoodStep = model.getWeights();
    let caught: unknown = null;
    for (let i = 0; i < 5 && !caught; i++) {
      const w = model.getWeights();
      try {
        trainer.step(batch);
        weightsBeforeLastGoodStep = w;
      } catch (e) {
        caught = e;
      }
    }
    expect(caught).toBeInstanceOf(NonFiniteLossError);
    expect((caught as Error).message).toMatch(/lower the learning rate/);
    expect(model.getWeights()).toEqual(weightsBeforeLastGoodStep);
    expect(Object.values(model.getWeights()).every((w) => w.values.every(Number.isFinite))).toBe(true);
    trainer.dispose();
    model.dispose();
  });

  it('a poisoned weight fails the first step and leaves every weight as it was', () => {
    const model = new StateSpaceModel(settings, 'poison');
    const w = model.getWeights();
    (w['obs.w'] as { values: Float32Array }).values[0] = Number.NaN;
    model.setWeights(w);
    const trainer = new SsmTrainer(model, { learningRate: 0.01, samples: 2, clipNorm: 1 });
    expect(() => trainer.step(batch)).toThrow(NonFiniteLossError);
    expect(trainer.stepCount).toBe(0);
    expect(model.getWeights()).toEqual(w);
    trainer.dispose();
    model.dispose();
  });
});
