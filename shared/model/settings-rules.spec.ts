/**
 * Every consumer of the model-settings rules (settings-rules.ts) accepts and refuses the same values: the API
 * schemas, the checkpoint reader, the model validation and the command line. (The new-run form's validators
 * are checked in src/app/runs/run-form-limits.spec.ts.)
 */
import { describe, expect, it } from 'vitest';
import { flowStackSchema, gruModelSchema, ngramModelSchema, RUN_FAMILIES, ssmModelSchema, trainingSchema } from '../api/runs';
import { parseTrainArgs } from '../cli/train-options';
import { buildAlphabet } from '../data/encode';
import { decodeCheckpoint, encodeCheckpoint } from './checkpoint';
import { validateFlowSpec } from './flows/flow';
import { KneserNeyModel } from './ngram-kn';
import { FLOW_KIND_NAMES, KN_DISCOUNT_RANGE, MODEL_FAMILIES, NEW_RUN_MODEL_DEFAULTS, NEW_RUN_TRAINING_DEFAULTS, SETTING_LIMITS } from './settings-rules';
import { defaultSsmSettings, validateSsmSettings } from './ssm-settings';

const ssmApi = { stateSize: 8, generativeFlow: [{ kind: 'diag' }], inferenceFlow: [{ kind: 'diag' }], flowHidden: 8, observationHidden: 0, embeddingSize: 4, encoderSize: 8, proposalHidden: 8 };
const cliOption: Record<string, string> = {
  stateSize: '--state-size', flowHidden: '--flow-hidden', observationHidden: '--obs-hidden', embeddingSize: '--embedding',
  encoderSize: '--encoder', proposalHidden: '--proposal-hidden', samples: '--samples', ngramOrder: '--order',
};
const accepts = (f: () => unknown) => { try { f(); return true; } catch { return false; } };
const cli = (...args: string[]) => accepts(() => parseTrainArgs(['--corpus', 'c.txt', ...args]));

describe('model-settings rules live in one place', () => {
  it('families: the API, the checkpoint reader and the command line take exactly the same', () => {
    expect([...RUN_FAMILIES]).toEqual([...MODEL_FAMILIES]);
    for (const family of MODEL_FAMILIES) {
      const bytes = encodeCheckpoint({ family, settings: {}, alphabet: ['a'], step: 0, seed: 1, weights: {}, createdAt: '2026-12-01T00:00:00Z' });
      expect(decodeCheckpoint(bytes).family).toBe(family);
      expect(cli('--model', family)).toBe(true);
    }
    expect(() => encodeCheckpoint({ family: 'lstm' as never, settings: {}, alphabet: [], step: 0, seed: 1, weights: {}, createdAt: '' })).toThrow(/Unknown model family/);
    expect(cli('--model', 'lstm')).toBe(false);
  });

  it('flow kinds and stack lengths agree between the API, the model core and the command line', () => {
    for (const kind of [...FLOW_KIND_NAMES, 'spiral']) {
      const known = (FLOW_KIND_NAMES as readonly string[]).includes(kind);
      expect(flowStackSchema.safeParse([{ kind }]).success).toBe(known);
      expect(accepts(() => validateFlowSpec([{ kind }], 'flow'))).toBe(known);
      expect(cli('--gen-flow', kind)).toBe(known);
    }
    const [, most] = SETTING_LIMITS.flowLayers;
    for (const n of [most, most + 1]) {
      const stack = Array.from({ length: n }, () => 'diag');
      expect(flowStackSchema.safeParse(stack.map((kind) => ({ kind }))).success).toBe(n <= most);
      expect(cli('--inf-flow', stack.join(','))).toBe(n <= most);
    }
  });

  it.each(Object.keys(cliOption))('limits of %s agree between the API, the model core and the command line', (key) => {
    const [lo, hi] = SETTING_LIMITS[key as keyof typeof SETTING_LIMITS];
    for (const value of [lo - 1, lo, hi, hi + 1]) {
      const ok = value >= lo && value <= hi;
      expect(cli(cliOption[key] as string, String(value))).toBe(ok);
      if (key === 'samples') expect(trainingSchema.safeParse({ steps: 1, batchSize: 1, learningRate: 0.1, samples: value }).success).toBe(ok);
      else if (key === 'ngramOrder') {
        expect(ngramModelSchema.safeParse({ order: value }).success).toBe(ok);
        expect(accepts(() => KneserNeyModel.estimate([{ word: 'ab', count: 1 }], buildAlphabet(['ab']), { order: value }))).toBe(ok);
      } else {
        expect(ssmModelSchema.safeParse({ ...ssmApi, [key]: value }).success).toBe(ok);
        expect(accepts(() => validateSsmSettings(defaultSsmSettings(5, { [key]: value })))).toBe(ok);
        if (['stateSize', 'embeddingSize', 'observationHidden'].includes(key)) {
          expect(gruModelSchema.safeParse({ stateSize: 8, embeddingSize: 4, observationHidden: 0, [key]: value }).success).toBe(ok);
        }
      }
    }
  });

  it('the Kneser–Ney discount range is (0, 1] everywhere', () => {
    expect(KN_DISCOUNT_RANGE.text).toBe('(0, 1]');
    const fitted = (discount: number) => accepts(() => KneserNeyModel.estimate([{ word: 'ab', count: 1 }], buildAlphabet(['ab']), { order: 2, discount }));
    for (const [d, ok] of [[0, false], [0.5, true], [1, true], [1.01, false]] as const) {
      expect(ngramModelSchema.safeParse({ order: 2, discount: d }).success).toBe(ok);
      expect(fitted(d)).toBe(ok);
      expect(cli('--model', 'ngram', '--discount', String(d))).toBe(ok);
    }
  });

  it('the command line starts a run from the same defaults as the form', () => {
    const o = parseTrainArgs(['--corpus', 'c.txt'])!;
    const d = NEW_RUN_MODEL_DEFAULTS;
    expect({ stateSize: o.stateSize, flowHidden: o.flowHidden, observationHidden: o.observationHidden, embeddingSize: o.embeddingSize,
      encoderSize: o.encoderSize, proposalHidden: o.proposalHidden, samples: o.samples, ngramOrder: o.order,
      generativeFlow: o.generativeFlow.map((l) => l.kind), inferenceFlow: o.inferenceFlow.map((l) => l.kind) })
      .toEqual({ ...d, generativeFlow: [...d.generativeFlow], inferenceFlow: [...d.inferenceFlow] });
  });

  it('the command line trains with the same training defaults as the form', () => {
    const o = parseTrainArgs(['--corpus', 'c.txt'])!;
    expect({ steps: o.steps, batchSize: o.batchSize, learningRate: o.learningRate, clipNorm: o.clipNorm, warmupSteps: o.warmupSteps,
      observationInitScale: o.observationInitScale }).toEqual({ ...NEW_RUN_TRAINING_DEFAULTS });
    expect(cli('--obs-init-scale', '0')).toBe(false);
    expect(cli('--obs-init-scale', '2.5')).toBe(true);
  });
});
