/** `npm run evaluate` as a function: load checkpoint + corpus, compute every §7 figure, return report and table. */
import { readFileSync, writeFileSync } from 'node:fs';
import { basename } from 'node:path';
import type { WordCount } from '../data/encode';
import { readTrainingWordsRecord, trainingWordsDigest, type TrainingWordsRecord } from '../data/training-words';
import { gruLogProbs, ngramLogProbs } from '../eval/baseline-figures';
import { UnigramCharModel } from '../eval/corpus-entropy';
import { heldOutSubsetNote } from '../eval/held-out-subset';
import { decodeCheckpoint, type Checkpoint } from '../model/checkpoint';
import { GruLanguageModel } from '../model/gru-lm';
import { KneserNeyModel } from '../model/ngram-kn';
import { modelFromCheckpoint } from '../model/ssm-checkpoint';
import { initNodeBackend } from '../node/tf-node';
import { gruFrom } from '../training/evaluation-job';
import { evaluateExact, evaluateSsm, heldOutSample, type EvaluationData, type ExactEvaluation, type SsmEvaluation } from '../eval/evaluation-report';
import { stepsOf } from '../eval/units';
import { checkWordsFit, loadCorpus } from './corpus-file';
import type { EvaluateOptions } from './evaluate-options';
import { reportTable } from './report-table';
import { loadHeldOutFile } from './word-file';

export interface EvaluationOutput {
  checkpoint: { path: string; family: Checkpoint['family']; step: number; settings: unknown; createdAt: string };
  corpus: string;
  heldOutSplit: string;
  settings: EvaluateOptions['settings'];
  /** Where the training words and the held-out words came from, and how many were scored. */
  data: { trainingWords: string; heldOut: string; scored: number; heldOutWords: number; note: string };
  result: SsmEvaluation | ExactEvaluation;
}

function readCheckpoint(path: string): Checkpoint {
  let bytes: Uint8Array;
  try {
    bytes = new Uint8Array(readFileSync(path));
  } catch (e) {
    throw new Error(`Cannot read the checkpoint "${path}" (${(e as NodeJS.ErrnoException).code ?? (e as Error).message}); check the path.`);
  }
  return decodeCheckpoint(bytes);
}

/** The split settings: given options first, then the checkpoint's record, then the defaults. */
function splitSettings(o: EvaluateOptions, rec: TrainingWordsRecord | null) {
  return {
    splitSeed: o.splitSeed ?? rec?.splitSeed ?? 1,
    shares: o.shares ?? rec?.shares ?? { train: 0.8, validation: 0.1, test: 0.1 },
    keepCase: o.keepCase ?? rec?.keepCase ?? false,
  };
}

function describeTraining(rec: TrainingWordsRecord | null, train: readonly WordCount[], o: EvaluateOptions): string {
  if (!rec) return `${train.length} training words rebuilt from --split (the checkpoint does not record its training words)`;
  const digest = trainingWordsDigest(train);
  if (digest !== rec.digest) {
    throw new Error(`The training words rebuilt from "${o.corpus}" (${train.length} types) are not the ones the model was trained on ` +
      `(${rec.types} types from "${rec.corpus}", split ${rec.shares.train},${rec.shares.validation},${rec.shares.test} seed ${rec.splitSeed}` +
      `${rec.keepCase ? ', case kept' : ''}). Give that corpus file, and leave out --split, --split-seed and --keep-case.`);
  }
  return `the model's ${rec.types} training words (checked against the checkpoint)`;
}

export async function runEvaluation(o: EvaluateOptions): Promise<{ output: EvaluationOutput; table: string }> {
  await initNodeBackend(o.backend);
  const ck = readCheckpoint(o.checkpoint);
  const rec = readTrainingWordsRecord(ck.trainingWords);
  const split = splitSettings(o, rec);
  const corpus = loadCorpus(o.corpus, {
    splitSeed: split.splitSeed, shares: split.shares,
    parse: { normalise: { lowerCase: !split.keepCase, nfc: true, stripDiacritics: false, outsideAlphabet: 'drop-word',
      ...(rec?.allowedChars ? { allowedChars: rec.allowedChars } : {}) } },
  });
  const alphabet = checkWordsFit(corpus.words, ck.alphabet);
  const train = corpus.parts.train;
  const trainingNote = describeTraining(rec, train, o);
  const heldOut = o.heldOutFile ? loadHeldOutFile(o.heldOutFile, alphabet, { keepCase: split.keepCase, option: '--held-out-file' })
    : corpus.parts[o.heldOutSplit];
  if (heldOut.length === 0) {
    throw new Error(o.heldOutFile ? `The held-out file "${o.heldOutFile}" has no words.`
      : `The ${o.heldOutSplit} split is empty; ${rec?.validationFile ? `the run trained on the whole corpus and validated on "${rec.validationFile}": give --held-out-file <file>` : 'change --split or --held-out, or give --held-out-file <file>'}.`);
  }
  const data: EvaluationData = { alphabet, corpus: corpus.words, train, heldOut };
  const ngram = KneserNeyModel.estimate(train, alphabet, { order: o.ngramOrder });
  let result: SsmEvaluation | ExactEvaluation;
  let perWordModel: { logP: number; exact: boolean }[] = [];
  let gru: GruLanguageModel | undefined;
  try {
    if (ck.family === 'ssm') {
      const model = modelFromCheckpoint(ck);
      const gruCk = o.gruBaseline ? readCheckpoint(o.gruBaseline) : null;
      if (gruCk && gruCk.family !== 'gru') throw new Error(`--baseline must be a GRU checkpoint (it holds a ${gruCk.family} model).`);
      if (gruCk && gruCk.alphabet.join('') !== ck.alphabet.join('')) throw new Error('The GRU baseline was trained with another alphabet; train it on the same corpus.');
      gru = gruCk ? gruFrom(gruCk) : undefined;
      try {
        result = evaluateSsm(model, data, o.settings, { ngram, gru }, undefined,
          (rows) => { perWordModel = rows.map((r) => ({ logP: r.logP, exact: false })); });
      } finally {
        model.dispose();
      }
    } else if (ck.family === 'gru') {
      const model = gruFrom(ck);
      try {
        result = evaluateExact('gru', model, data, o.settings, ngram);
        if (o.perWord) perWordModel = Array.from(gruLogProbs(model, scoredWords(data, o), alphabet), (logP) => ({ logP, exact: true }));
      } finally {
        model.dispose();
      }
    } else {
      const model = KneserNeyModel.fromJSON(ck.settings);
      result = evaluateExact('ngram', model, data, o.settings, ngram);
      perWordModel = Array.from(ngramLogProbs(model, scoredWords(data, o)), (logP) => ({ logP, exact: true }));
    }
    if (o.perWord) writePerWord(o.perWord, data, scoredWords(data, o), perWordModel, ngram, gru);
  } finally {
    gru?.dispose();
  }
  const scored = scoredWords(data, o).length;
  const output: EvaluationOutput = {
    checkpoint: { path: o.checkpoint, family: ck.family, step: ck.step, settings: ck.settings, createdAt: ck.createdAt },
    corpus: o.corpus, heldOutSplit: o.heldOutFile ? `file ${basename(o.heldOutFile)}` : o.heldOutSplit, settings: o.settings,
    data: {
      trainingWords: trainingNote,
      heldOut: o.heldOutFile ? `the words of ${o.heldOutFile}` : `the ${o.heldOutSplit} split of ${o.corpus}`,
      scored, heldOutWords: heldOut.length, note: heldOutSubsetNote(scored, heldOut.length),
    },
    result,
  };
  return { output, table: reportTable(output) };
}

function scoredWords(data: EvaluationData, o: EvaluateOptions): string[] {
  return heldOutSample(data.heldOut, o.settings.maxHeldOut, o.settings.seed);
}

const bits = (logP: number) => -logP / Math.LN2;

/** One JSON line per scored word: bits (−log2 p), bits per character (end-of-word counted), the baselines'. */
function writePerWord(path: string, data: EvaluationData, words: string[], model: { logP: number; exact: boolean }[],
                      ngram: KneserNeyModel, gru?: GruLanguageModel): void {
  const counts = new Map(data.heldOut.map((w) => [w.word, w.count]));
  const uni = new UnigramCharModel(data.train, data.alphabet);
  const ng = ngramLogProbs(ngram, words);
  const gr = gru ? gruLogProbs(gru, words, data.alphabet) : null;
  const lines = words.map((word, i) => {
    const steps = stepsOf(word);
    const m = model[i] as { logP: number; exact: boolean };
    return JSON.stringify({
      word, count: counts.get(word) ?? 0, characters: steps,
      bits: bits(m.logP), bitsPerChar: bits(m.logP) / steps, exact: m.exact,
      ngramBits: bits(ng[i] as number), unigramBits: bits(uni.logProb(word)),
      ...(gr ? { gruBits: bits(gr[i] as number) } : {}),
    });
  });
  try {
    writeFileSync(path, lines.length ? `${lines.join('\n')}\n` : '');
  } catch (e) {
    throw new Error(`Cannot write the per-word file "${path}" (${(e as NodeJS.ErrnoException).code ?? (e as Error).message}); check the folder.`);
  }
}
