/**
 * The stored-evaluation schema must accept exactly what the evaluation code produces: a tiny untrained
 * state-space model and GRU are evaluated with small settings, sent through JSON like a request body, and
 * checked against the schema (nothing may be dropped). No figure values are asserted here: the estimators
 * have their own specs (shared/eval/estimators.spec.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet } from '../data/encode';
import { evaluateExact, evaluateSsm, type EvaluationData } from '../eval/evaluation-report';
import { GruLanguageModel } from '../model/gru-lm';
import { defaultGruSettings } from '../model/gru-lm';
import { KneserNeyModel } from '../model/ngram-kn';
import { StateSpaceModel } from '../model/ssm';
import { defaultSsmSettings } from '../model/ssm-settings';
import { initNodeBackend } from '../node/tf-node';
import { createEvaluationSchema, evaluationSettingsKey, evaluationSettingsSchema, toReportSettings } from './evaluations';

const words = [{ word: 'abba', count: 5 }, { word: 'baba', count: 3 }, { word: 'cab', count: 2 }, { word: 'abc', count: 2 }, { word: 'aa', count: 4 }, { word: 'acab', count: 1 }];
const alphabet = buildAlphabet(words.map((w) => w.word));
const data: EvaluationData = { alphabet, corpus: words, train: words.slice(0, 4), heldOut: words.slice(4) };
const settings = evaluationSettingsSchema.parse({ K: 8, repeats: 2, S: 16, crossEntropyK: 4, M: 4, sampleCount: 20, detailWords: 2, maxHeldOut: 2, tMax: 8, particles: 16, prefixes: ['a'], seed: 5 });

let ssm: StateSpaceModel;
let gru: GruLanguageModel;
beforeAll(async () => {
  await initNodeBackend('wasm');
  ssm = new StateSpaceModel(defaultSsmSettings(alphabet.size, { stateSize: 2, flowHidden: 4, encoderSize: 4, proposalHidden: 4, embeddingSize: 2 }), 3);
  gru = new GruLanguageModel(defaultGruSettings(alphabet.size, 4), 3);
});
afterAll(() => { ssm.dispose(); gru.dispose(); });

describe('evaluation request schema', () => {
  it('accepts the results of evaluateSsm unchanged after a JSON round trip', () => {
    const results = JSON.parse(JSON.stringify(evaluateSsm(ssm, data, toReportSettings(settings), { gru }))) as unknown;
    const parsed = createEvaluationSchema.safeParse({ settings, results });
    expect(parsed.success ? [] : parsed.error.issues).toEqual([]);
    expect(parsed.data!.results).toEqual(results);
  });

  it('accepts the results of evaluateExact for a GRU unchanged', () => {
    const results = JSON.parse(JSON.stringify(evaluateExact('gru', gru, data, toReportSettings(settings)))) as unknown;
    const parsed = createEvaluationSchema.safeParse({ settings, results });
    expect(parsed.success ? [] : parsed.error.issues).toEqual([]);
    expect(parsed.data!.results).toEqual(results);
  });

  it('accepts the results of evaluateExact for an n-gram model (with an n-gram baseline) unchanged', () => {
    const ngram = KneserNeyModel.estimate(data.train, alphabet, { order: 3 });
    const results = JSON.parse(JSON.stringify(evaluateExact('ngram', ngram, data, toReportSettings(settings), ngram))) as unknown;
    const parsed = createEvaluationSchema.safeParse({ settings, results });
    expect(parsed.success ? [] : parsed.error.issues).toEqual([]);
    expect(parsed.data!.results).toEqual(results);
  });

  it('maps the stored settings onto the estimator settings and keys equal settings alike', () => {
    expect(toReportSettings(settings)).toMatchObject({ tightK: 8, repeats: 2, trajectories: 16, crossEntropyK: 4, noiseDraws: 4, samples: 20, seed: 5 });
    const reordered = evaluationSettingsSchema.parse({ seed: 5, prefixes: ['a'], particles: 16, tMax: 8, maxHeldOut: 2, detailWords: 2, sampleCount: 20, M: 4, crossEntropyK: 4, S: 16, repeats: 2, K: 8 });
    expect(evaluationSettingsKey(reordered)).toBe(evaluationSettingsKey(settings));
    expect(evaluationSettingsKey({ ...settings, K: 9 })).not.toBe(evaluationSettingsKey(settings));
  });
});
