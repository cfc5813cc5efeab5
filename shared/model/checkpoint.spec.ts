import { beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet, encodeBatch } from '../data/encode';
import { initNodeBackend } from '../node/tf-node';
import { CheckpointError, decodeCheckpoint, encodeCheckpoint, type Checkpoint } from './checkpoint';
import { StateSpaceModel } from './ssm';
import { checkSsmCheckpoint, modelFromCheckpoint, restoreTrainer, ssmCheckpoint } from './ssm-checkpoint';
import { defaultSsmSettings, type SsmSettings } from './ssm-settings';
import { SsmTrainer } from './trainer';

beforeAll(async () => {
  await initNodeBackend();
});

const words = ['kolu', 'vem', 'asta', 'ri'];
const alphabet = buildAlphabet(words);
const settings: SsmSettings = defaultSsmSettings(alphabet.size, {
  stateSize: 3,
  flowHidden: 5,
  embeddingSize: 4,
  encoderSize: 5,
  proposalHidden: 6,
  generativeFlow: [{ kind: 'coupling' }, { kind: 'tril' }],
});

/** Bit patterns of a float array (so NaN payloads and -0 count too). */
const bits = (a: Float32Array) => Array.from(new Uint32Array(a.buffer, a.byteOffset, a.length));

function sample(): Checkpoint {
  const weights = {
    a: { shape: [2, 3], values: Float32Array.of(1.5, -0, Number.NaN, 1e-45, -3.4028234663852886e38, Math.PI) },
    'b/c': { shape: [1], values: Float32Array.of(Number.POSITIVE_INFINITY) },
    empty: { shape: [0, 4], values: new Float32Array(0) },
  };
  return {
    formatVersion: 1,
    family: 'gru',
    settings: { stateSize: 8, note: 'ünïcødé ✓' },
    alphabet: ['a', 'é', '𝔵'],
    step: 123,
    seed: 'seed-ü',
    weights,
    optimizer: { t: { shape: [1], values: Float32Array.of(7) } },
    createdAt: '2026-01-02T03:04:05.000Z',
  };
}

describe('checkpoint format', () => {
  it('round-trips every value bit for bit, header fields included', () => {
    const ck = sample();
    const bytes = encodeCheckpoint(ck);
    // Layout check against CHECKPOINT-FORMAT.md: magic, version 1 (LE), 4-byte aligned payload.
    expect(String.fromCharCode(...bytes.subarray(0, 4))).toBe('NWCK');
    expect(new DataView(bytes.buffer).getUint32(4, true)).toBe(1);
    expect(bytes.length % 4).toBe(0);
    const back = decodeCheckpoint(bytes);
    expect(back.family).toBe('gru');
    expect(back.settings).toEqual(ck.settings);
    expect(back.alphabet).toEqual(ck.alphabet);
    expect([back.step, back.seed, back.createdAt]).toEqual([123, 'seed-ü', ck.createdAt]);
    for (const group of ['weights', 'optimizer'] as const) {
      for (const [name, t] of Object.entries(ck[group] ?? {})) {
        const got = back[group]?.[name];
        expect(got?.shape).toEqual(t.shape);
        expect(bits(got?.values as Float32Array)).toEqual(bits(t.values));
      }
    }
  });

  it('names the problem: wrong magic, unsupported version, truncated, corrupt header', () => {
    const bytes = encodeCheckpoint(sample());
    const code = (b: Uint8Array) => {
      try {
        decodeCheckpoint(b);
      } catch (e) {
        expect(e).toBeInstanceOf(CheckpointError);
        return `${(e as CheckpointError).code}: ${(e as Error).message}`;
      }
      return 'no error';
    };
    const wrongMagic = bytes.slice();
    wrongMagic[0] = 'X'.charCodeAt(0);
    expect(code(wrongMagic)).toMatch(/^BAD_MAGIC: .*not a Noisewright checkpoint/);
    expect(code(new TextEncoder().encode('{"json": true}'))).toMatch(/^BAD_MAGIC/);
    const future = bytes.slice();
    new DataView(future.buffer).setUint32(4, 2, true);
    expect(code(future)).toMatch(/^UNSUPPORTED_VERSION: .*format version 2/);
    expect(code(bytes.subarray(0, bytes.length - 4))).toMatch(/^TRUNCATED: .*weights/);
    expect(code(bytes.subarray(0, 20))).toMatch(/^TRUNCATED: .*settings block/);
    expect(code(bytes.subarray(0, 6))).toMatch(/^TRUNCATED/);
    const damaged = bytes.slice();
    damaged[12] = '}'.charCodeAt(0);
    expect(code(damaged)).toMatch(/^CORRUPT/);
    const extra = new Uint8Array(bytes.length + 4);
    extra.set(bytes);
    expect(code(extra)).toMatch(/^CORRUPT: .*unexpected bytes/);
  });

  it('restores a state-space model exactly and rejects weights that do not fit its settings', () => {
    const model = new StateSpaceModel(settings, 'ck');
    const ck = decodeCheckpoint(encodeCheckpoint(ssmCheckpoint(model, { alphabet: alphabet.chars, seed: 'ck' })));
    const restored = modelFromCheckpoint(ck);
    expect(restored.getWeights()).toEqual(model.getWeights());
    restored.dispose();

    const edited = structuredClone(ck);
    (edited.settings as SsmSettings).stateSize = 4; // the stored weights are for d = 3
    expect(() => checkSsmCheckpoint(edited)).toThrow(CheckpointError);
    expect(() => modelFromCheckpoint(edited)).toThrow(/shape \[.*\] .* but these settings need/);
    try {
      checkSsmCheckpoint(edited);
    } catch (e) {
      expect((e as CheckpointError).code).toBe('SHAPE_MISMATCH');
    }
    const otherFamily = { ...ck, family: 'ngram' as const };
    expect(() => checkSsmCheckpoint(otherFamily)).toThrow(/holds a ngram model/);
    model.dispose();
  });

  it('resumes training exactly: checkpoint + restore gives the same weights as an uninterrupted run', () => {
    const batch = encodeBatch(words, alphabet);
    const trainerSettings = { learningRate: 0.01, samples: 3, clipNorm: 5 };
    const model = new StateSpaceModel(settings, 'resume');
    const trainer = new SsmTrainer(model, trainerSettings);
    for (let i = 0; i < 3; i++) trainer.step(batch);
    const bytes = encodeCheckpoint(ssmCheckpoint(model, { alphabet: alphabet.chars, seed: 'resume', trainer }));
    for (let i = 0; i < 2; i++) trainer.step(batch);
    const uninterrupted = model.getWeights();

    const ck = decodeCheckpoint(bytes);
    expect(ck.step).toBe(3);
    const model2 = modelFromCheckpoint(ck);
    const trainer2 = new SsmTrainer(model2, trainerSettings);
    restoreTrainer(trainer2, ck);
    expect(trainer2.stepCount).toBe(3);
    for (let i = 0; i < 2; i++) trainer2.step(batch);
    const resumed = model2.getWeights();
    for (const [name, w] of Object.entries(uninterrupted)) {
      expect(bits(resumed[name]?.values as Float32Array), name).toEqual(bits(w.values));
    }
    // Without the optimiser state the run would differ (fresh Adam moments): the state matters.
    const model3 = modelFromCheckpoint(ck);
    const trainer3 = new SsmTrainer(model3, trainerSettings);
    for (let i = 0; i < 2; i++) trainer3.step(batch);
    expect(model3.getWeights()['obs.w']?.values).not.toEqual(uninterrupted['obs.w']?.values);
    [trainer, trainer2, trainer3].forEach((t) => t.dispose());
    [model, model2, model3].forEach((m) => m.dispose());
  });
});
