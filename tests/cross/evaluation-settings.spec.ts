/**
 * The evaluation settings the page lets a person choose — the held-out split and the order of the Kneser–Ney
 * baseline — reach `runEvaluationJob` (src/app/workers/evaluator-job.ts, the evaluation worker's computation) and
 * the stored evaluation: a different order gives different baseline figures, a different split scores other
 * words, bad choices are refused before any compute, and the server keeps one evaluation per checkpoint and
 * settings (409 for the same settings, a new row for another split or order, the same key as before for the
 * defaults). Driven in Node as tests/cross/evaluation-parity.spec.ts does; the corpus is the invented demo corpus
 * datasets-demo/tea-blends.tsv, and the evaluated checkpoint is a Kneser–Ney model (no tensors needed).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../shared/api/errors';
import { evaluationSettingsKey, evaluationSettingsSchema, type EvaluationDto, type EvaluationExistsBody } from '../../shared/api/evaluations';
import type { CheckpointDto, RunDto, TrainingSet as CorpusTrainingSet } from '../../shared/api/runs';
import { parseCorpus } from '../../shared/data/corpus-parse';
import { alphabetFromChars } from '../../shared/data/encode';
import { splitCorpus, splitOf } from '../../shared/data/split';
import { CHECKPOINT_FORMAT_VERSION, encodeCheckpoint } from '../../shared/model/checkpoint';
import { KneserNeyModel } from '../../shared/model/ngram-kn';
import { ssmResultsFixture } from '../../server/modules/evaluations/evaluation-test-fixture';
import { createRun, ssmCheckpointBytes, ssmRunBody, uploadCorpus } from '../../server/modules/runs/runs-test-helpers';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../server/testing/test-app';
import { evaluationData, runEvaluationJob, type EvaluationJobInput } from '../../src/app/workers/evaluator-job';

const SHARES = { train: 0.7, validation: 0.15, test: 0.15 };

/** The demo corpus as the server's `GET .../training-set` returns it (same parser, split seed 5, count-descending). */
function demoTrainingSet(): CorpusTrainingSet {
  const parsed = parseCorpus(new Uint8Array(readFileSync(join(__dirname, '../../datasets-demo/tea-blends.tsv'))), {
    fileName: 'tea-blends.tsv', mergeDuplicates: true,
    normalise: { lowerCase: true, nfc: true, stripDiacritics: false, outsideAlphabet: 'drop-word' },
  });
  const { parts } = splitCorpus(parsed.words, 5, SHARES);
  const splitOfWord = new Map<string, 'train' | 'validation' | 'test'>();
  for (const name of ['train', 'validation', 'test'] as const) for (const w of parts[name]) splitOfWord.set(w.word, name);
  const words = parsed.words.slice().sort((a, b) => b.count - a.count || (a.word < b.word ? -1 : 1));
  return { alphabet: parsed.alphabet.chars, words: words.map((w) => w.word), counts: words.map((w) => w.count), splits: words.map((w) => splitOfWord.get(w.word)!) };
}

const corpus = demoTrainingSet();
const trainWords = corpus.words.map((word, i) => ({ word, count: corpus.counts[i]! })).filter((_, i) => corpus.splits[i] === 'train');
/** The evaluated checkpoint: a Kneser–Ney 2-gram fitted on the training words (the n-gram family's checkpoint). */
const bigram = KneserNeyModel.estimate(trainWords, alphabetFromChars(corpus.alphabet), { order: 2 });
const checkpoint = encodeCheckpoint({
  formatVersion: CHECKPOINT_FORMAT_VERSION, family: 'ngram', settings: bigram.toJSON(), alphabet: corpus.alphabet, step: 0, seed: 1,
  weights: {}, createdAt: '2026-12-01T00:00:00.000Z',
});
/** Every held-out word scored (the demo corpus has fewer than 200 per split), seed 1; the rest as the server's defaults. */
const settings = { tightK: 16, repeats: 1, trajectories: 16, crossEntropyK: 0, noiseDraws: 8, detailWords: 10, samples: 10, tMax: 24,
  particles: 16, prefixes: [], maxHeldOut: 100_000, seed: 1 };
const job = (over: Partial<EvaluationJobInput> = {}): EvaluationJobInput =>
  ({ checkpoint, corpus, split: null, heldOutSplit: 'test', ngramOrder: 3, settings, ...over });
const wordsOf = (part: 'validation' | 'test') => corpus.words.filter((_, i) => corpus.splits[i] === part);

describe('runEvaluationJob with the chosen baseline order and held-out split', () => {
  it('fits the Kneser–Ney baseline of the chosen order: orders 2 and 4 give different baseline figures', () => {
    const two = runEvaluationJob(job({ ngramOrder: 2 }));
    const four = runEvaluationJob(job({ ngramOrder: 4 }));
    expect(two.baselines.ngram?.order).toBe(2);
    expect(four.baselines.ngram?.order).toBe(4);
    expect(four.baselines.ngram!.bitsPerChar).not.toBeCloseTo(two.baselines.ngram!.bitsPerChar, 3);
    expect(four.baselines.ngram!.crossEntropy.crossEntropyBits).not.toBeCloseTo(two.baselines.ngram!.crossEntropy.crossEntropyBits, 3);
    // Only the baseline changes: the evaluated model's own figures and the unigram baseline do not depend on the order.
    expect(four.baselines.unigram).toEqual(two.baselines.unigram);
    if (two.family === 'ssm' || four.family === 'ssm') throw new Error('an n-gram checkpoint gives exact figures');
    expect(four.heldOut).toEqual(two.heldOut);
    // The evaluated model is itself a 2-gram fitted on the same training words, so at order 2 the baseline is the
    // same model: its figures must equal the model's held-out figures (they differ at order 4, above).
    expect(two.baselines.ngram!.bitsPerWord).toBeCloseTo(two.heldOut.bitsPerWord, 12);
    expect(four.baselines.ngram!.bitsPerWord).not.toBeCloseTo(two.heldOut.bitsPerWord, 3);
  });

  it('scores the held-out words of the chosen split (bits per word = mean −log₂ p over them, MODEL.md section 7)', () => {
    const test = runEvaluationJob(job({ heldOutSplit: 'test', ngramOrder: 4 }));
    const validation = runEvaluationJob(job({ heldOutSplit: 'validation', ngramOrder: 4 }));
    const [valWords, testWords] = [wordsOf('validation'), wordsOf('test')];
    expect(valWords.length).toBeGreaterThan(0);
    expect(testWords.length).toBeGreaterThan(0);
    expect(validation.baselines.unigram.words).toBe(valWords.length);
    expect(test.baselines.unigram.words).toBe(testWords.length);
    // Independent of evaluation-report.ts: the definition, summed here over the chosen split's words with a
    // 4-gram fitted on the training words.
    const four = KneserNeyModel.estimate(trainWords, alphabetFromChars(corpus.alphabet), { order: 4 });
    const meanBits = (ws: string[]) => ws.reduce((a, w) => a - four.logProb(w) / Math.LN2, 0) / ws.length;
    expect(validation.baselines.ngram!.bitsPerWord).toBeCloseTo(meanBits(valWords), 9);
    expect(test.baselines.ngram!.bitsPerWord).toBeCloseTo(meanBits(testWords), 9);
    expect(validation.baselines.ngram!.bitsPerWord).not.toBeCloseTo(test.baselines.ngram!.bitsPerWord, 3);
  });

  it('takes the held-out words from the chosen split, also with a run of its own split', () => {
    const chars = corpus.alphabet;
    const val = evaluationData(job({ heldOutSplit: 'validation' }), chars).heldOut.map((w) => w.word);
    const test = evaluationData(job({ heldOutSplit: 'test' }), chars).heldOut.map((w) => w.word);
    expect(new Set(val)).toEqual(new Set(wordsOf('validation')));
    expect(new Set(test)).toEqual(new Set(wordsOf('test')));
    expect(val.filter((w) => test.includes(w))).toEqual([]);
    const own = { seed: 11, shares: { train: 0.5, validation: 0.25, test: 0.25 } };
    const ownVal = evaluationData(job({ heldOutSplit: 'validation', split: own }), chars).heldOut.map((w) => w.word);
    expect(ownVal.length).toBeGreaterThan(0);
    expect(ownVal.every((w) => splitOf(w, own.seed, own.shares) === 'validation')).toBe(true);
    expect(new Set(ownVal)).not.toEqual(new Set(val));
  });

  it('refuses an order outside 1–6 or another split with a sentence that says what to choose', () => {
    for (const bad of [0, 7, 2.5]) {
      expect(() => runEvaluationJob(job({ ngramOrder: bad }))).toThrow(`The n-gram baseline order must be a whole number from 1 to 6 (got ${bad}).`);
    }
    expect(() => runEvaluationJob(job({ heldOutSplit: 'train' as 'test' }))).toThrow('Choose the held-out split validation or test (got "train").');
    // The ends of the range are accepted.
    expect(runEvaluationJob(job({ ngramOrder: 1 })).baselines.ngram?.order).toBe(1);
    expect(runEvaluationJob(job({ ngramOrder: 6 })).baselines.ngram?.order).toBe(6);
  });
});

describe('stored evaluations record the split and the order', () => {
  let t: TestApp;
  let f: BenchFixture;
  let run: RunDto;
  let ck: CheckpointDto;
  const api = () => request(t.app);
  const url = () => `/api/benches/${f.benchId}/runs/${run.id}/checkpoints/${ck.id}/evaluations`;
  const post = (settings: Record<string, unknown>) => api().post(url()).set(bearer(f.tokens.member)).send({ settings, results: ssmResultsFixture() });

  beforeAll(async () => {
    t = await createTestApp();
    f = await createBenchFixture(t);
    const c = await uploadCorpus(t, f.benchId, f.tokens.member);
    run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(c.id, 'Settings SSM'));
    const res = await api().post(`/api/benches/${f.benchId}/runs/${run.id}/checkpoints?reason=manual`).set(bearer(f.tokens.member))
      .set('Content-Type', 'application/octet-stream').send(Buffer.from(ssmCheckpointBytes(c.alphabet, { step: 30 })));
    ck = res.body as CheckpointDto;
  });
  afterAll(async () => t.close());

  it('stores the chosen split and order, answers 409 for the same settings and stores other settings anew', async () => {
    const first = await post({ K: 256, heldOutSplit: 'validation', ngramOrder: 5 });
    expect(first.status).toBe(201);
    expect((first.body as EvaluationDto).settings).toMatchObject({ heldOutSplit: 'validation', ngramOrder: 5 });
    const again = await post({ ngramOrder: 5, K: 256, heldOutSplit: 'validation' });
    expect(again.status).toBe(409);
    expect((again.body as EvaluationExistsBody).error.code).toBe(ErrorCode.EvaluationExists);
    expect((again.body as EvaluationExistsBody).error.existing.id).toBe((first.body as EvaluationDto).id);
    expect((await post({ K: 256, heldOutSplit: 'validation', ngramOrder: 4 })).status).toBe(201);
    expect((await post({ K: 256, heldOutSplit: 'test', ngramOrder: 5 })).status).toBe(201);
    expect(await countRows(t, 'evaluations')).toBe(3);
  });

  it('refuses an order or split the page does not offer, with the field named, and stores nothing', async () => {
    const before = await countRows(t, 'evaluations');
    const order = await post({ K: 256, ngramOrder: 7 });
    expect(order.status).toBe(422);
    expect(order.body.error.fields['settings.ngramOrder']).toBe('Give the n-gram order of at most 6.');
    const split = await post({ K: 256, heldOutSplit: 'train' });
    expect(split.status).toBe(422);
    expect(split.body.error.fields['settings.heldOutSplit']).toBe('Choose the held-out split: validation or test.');
    expect(await countRows(t, 'evaluations')).toBe(before);
  });

  it('treats an evaluation stored before these settings existed as test split and order 3 (409 for the defaults)', async () => {
    const stored = (await post({ K: 512 })).body as EvaluationDto;
    // Rewrite the row as it was stored before: settings without the two keys, and the key computed from them.
    const { heldOutSplit: _s, ngramOrder: _o, ...old } = stored.settings;
    const oldKey = JSON.stringify(Object.keys(old).sort().map((k) => [k, (old as Record<string, unknown>)[k]]));
    expect(evaluationSettingsKey(evaluationSettingsSchema.parse({ K: 512 }))).toBe(oldKey);
    await t.orm.em.fork().getConnection().execute('update `evaluations` set `settings` = ?, `settings_key` = ? where `id` = ?',
      [JSON.stringify(old), oldKey, stored.id]);
    const same = await post({ K: 512, heldOutSplit: 'test', ngramOrder: 3 });
    expect(same.status).toBe(409);
    expect((same.body as EvaluationExistsBody).error.existing.id).toBe(stored.id);
    expect((await post({ K: 512, ngramOrder: 2 })).status).toBe(201);
  });
});
