/**
 * The `observationInitScale` training setting: a fresh state-space model's observation weights are multiplied by
 * it, nothing else changes, a resumed run keeps its stored weights, and runs stored without the setting train
 * with 1 (as before the setting existed). (The new-run form's default is checked in src/app/runs/new-run.)
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { learnabilityCells } from '../../server/modules/grids/learnability';
import { trainingSchema } from '../api/runs';
import { parseTrainArgs } from '../cli/train-options';
import { NEW_RUN_TRAINING_DEFAULTS } from '../model/settings-rules';
import { StateSpaceModel } from '../model/ssm';
import { defaultSsmSettings } from '../model/ssm-settings';
import { initNodeBackend } from '../node/tf-node';
import { applyObservationInitScale } from './observation-init';
import { createEngine } from './run-engines';
import { trainerSettingsOf } from './run-settings';
import type { TrainerSettings } from './training-types';

beforeAll(async () => {
  await initNodeBackend('cpu');
});

const SET = { alphabet: ['a', 'b', 'c'], train: [{ word: 'abc', count: 2 }, { word: 'cab', count: 1 }], validation: [{ word: 'bca', count: 1 }] };
const SETTINGS: TrainerSettings = {
  family: 'ssm', stateSize: 4, generativeFlow: ['diag'], inferenceFlow: ['diag'], flowHidden: 8, encoderSize: 8, embeddingSize: 4,
  proposalHidden: 8, observationHidden: 0, samples: 2, batchSize: 2, steps: 3, learningRate: 0.01, clipNorm: 5, warmupSteps: 0,
  regime: 'token', seed: 3, order: 3, evalEvery: 0,
};

describe('initial observation scale', () => {
  it.each([0, 6])('multiplies only the observation weights (observation hidden %i)', (observationHidden) => {
    const settings = defaultSsmSettings(4, { stateSize: 4, observationHidden });
    const plain = new StateSpaceModel(settings, 5);
    const scaled = new StateSpaceModel(settings, 5);
    applyObservationInitScale(scaled, 2.5);
    const a = plain.getWeights();
    const b = scaled.getWeights();
    const target = observationHidden > 0 ? 'obs.w2' : 'obs.w';
    for (const name of Object.keys(a)) {
      const expected = name === target ? Array.from(a[name]!.values, (x) => x * 2.5) : Array.from(a[name]!.values);
      Array.from(b[name]!.values).forEach((x, i) => expect(x).toBeCloseTo(expected[i]!, 5));
    }
    plain.dispose();
    scaled.dispose();
  });

  it('refuses a scale outside the setting\'s range (the one rule in settings-rules.ts)', () => {
    const model = new StateSpaceModel(defaultSsmSettings(4, { stateSize: 4 }), 5);
    expect(() => applyObservationInitScale(model, 0)).toThrow(/from 0\.1 to 20/);
    expect(() => applyObservationInitScale(model, 25)).toThrow(/from 0\.1 to 20/);
    model.dispose();
  });

  it('the engine scales a fresh model and leaves a resumed one as stored', () => {
    const obs = (e: ReturnType<typeof createEngine>) => Array.from(e.checkpoint().weights['obs.w']!.values);
    const plain = createEngine(SETTINGS, SET, null, { kind: 'bound', words: 1, k: 2 });
    const scaled = createEngine({ ...SETTINGS, observationInitScale: 4 }, SET, null, { kind: 'bound', words: 1, k: 2 });
    const base = obs(plain);
    obs(scaled).forEach((x, i) => expect(x).toBeCloseTo(4 * base[i]!, 5));
    const resumed = createEngine({ ...SETTINGS, observationInitScale: 4 }, SET, plain.checkpoint(), { kind: 'bound', words: 1, k: 2 });
    expect(obs(resumed)).toEqual(base);
    for (const e of [plain, scaled, resumed]) e.dispose();
  });

  it('new runs get the default (command line, learnability check); runs stored without it train with 1', () => {
    const defaultScale = NEW_RUN_TRAINING_DEFAULTS.observationInitScale;
    expect(parseTrainArgs(['--corpus', 'c.txt'])!.observationInitScale).toBe(defaultScale);
    const ssmCells = learnabilityCells(100, 1, { seed: 1, shares: { train: 0.8, validation: 0.1, test: 0.1 } }).filter((c) => c.family === 'ssm');
    for (const c of ssmCells) expect((c.settings as { training: { observationInitScale?: number } }).training.observationInitScale).toBe(defaultScale);
    expect(trainingSchema.safeParse({ steps: 10, batchSize: 4, learningRate: 0.01, observationInitScale: 0 }).success).toBe(false);
    const stored = trainingSchema.parse({ steps: 10, batchSize: 4, learningRate: 0.01 });
    expect(stored.observationInitScale).toBeUndefined();
    const model = { stateSize: 4, generativeFlow: [{ kind: 'diag' }], inferenceFlow: [{ kind: 'diag' }], flowHidden: 8, observationHidden: 0, embeddingSize: 4, encoderSize: 8, proposalHidden: 8 };
    expect(trainerSettingsOf({ family: 'ssm', settings: { model, training: stored } } as never).observationInitScale).toBe(1);
    const fresh = trainingSchema.parse({ steps: 10, batchSize: 4, learningRate: 0.01, observationInitScale: defaultScale });
    expect(trainerSettingsOf({ family: 'ssm', settings: { model, training: fresh } } as never).observationInitScale).toBe(defaultScale);
  });
});
