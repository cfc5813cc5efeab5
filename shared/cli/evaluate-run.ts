/** `npm run evaluate` as a function: load checkpoint + corpus, compute every §7 figure, return report and table. */
import { readFileSync } from 'node:fs';
import { decodeCheckpoint, type Checkpoint } from '../model/checkpoint';
import { GruLanguageModel, type GruSettings } from '../model/gru-lm';
import { KneserNeyModel } from '../model/ngram-kn';
import { modelFromCheckpoint } from '../model/ssm-checkpoint';
import { initNodeBackend } from '../node/tf-node';
import { evaluateExact, evaluateSsm, type EvaluationData, type ExactEvaluation, type SsmEvaluation } from '../eval/evaluation-report';
import { checkWordsFit, loadCorpus } from './corpus-file';
import type { EvaluateOptions } from './evaluate-options';
import { reportTable } from './report-table';

export interface EvaluationOutput {
  checkpoint: { path: string; family: Checkpoint['family']; step: number; settings: unknown; createdAt: string };
  corpus: string;
  heldOutSplit: string;
  settings: EvaluateOptions['settings'];
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

function gruFrom(ck: Checkpoint): GruLanguageModel {
  const model = new GruLanguageModel(ck.settings as GruSettings, ck.seed);
  try {
    model.setWeights(ck.weights);
  } catch (e) {
    model.dispose();
    throw e;
  }
  return model;
}

export async function runEvaluation(o: EvaluateOptions): Promise<{ output: EvaluationOutput; table: string }> {
  await initNodeBackend(o.backend);
  const ck = readCheckpoint(o.checkpoint);
  const corpus = loadCorpus(o.corpus, {
    splitSeed: o.splitSeed, shares: o.shares,
    parse: { normalise: { lowerCase: !o.keepCase, nfc: true, stripDiacritics: false, outsideAlphabet: 'drop-word' } },
  });
  const alphabet = checkWordsFit(corpus.words, ck.alphabet);
  const heldOut = corpus.parts[o.heldOutSplit];
  if (heldOut.length === 0) throw new Error(`The ${o.heldOutSplit} split is empty; change --split or --held-out.`);
  const data: EvaluationData = { alphabet, corpus: corpus.words, train: corpus.parts.train, heldOut };
  const ngram = KneserNeyModel.estimate(corpus.parts.train, alphabet, { order: o.ngramOrder });
  let result: SsmEvaluation | ExactEvaluation;
  if (ck.family === 'ssm') {
    const model = modelFromCheckpoint(ck);
    const gruCk = o.gruBaseline ? readCheckpoint(o.gruBaseline) : null;
    if (gruCk && gruCk.family !== 'gru') throw new Error(`--baseline must be a GRU checkpoint (it holds a ${gruCk.family} model).`);
    if (gruCk && gruCk.alphabet.join('') !== ck.alphabet.join('')) throw new Error('The GRU baseline was trained with another alphabet; train it on the same corpus.');
    const gru = gruCk ? gruFrom(gruCk) : undefined;
    try {
      result = evaluateSsm(model, data, o.settings, { ngram, gru });
    } finally {
      model.dispose();
      gru?.dispose();
    }
  } else if (ck.family === 'gru') {
    const model = gruFrom(ck);
    try {
      result = evaluateExact('gru', model, data, o.settings, ngram);
    } finally {
      model.dispose();
    }
  } else {
    result = evaluateExact('ngram', KneserNeyModel.fromJSON(ck.settings), data, o.settings, ngram);
  }
  const output: EvaluationOutput = {
    checkpoint: { path: o.checkpoint, family: ck.family, step: ck.step, settings: ck.settings, createdAt: ck.createdAt },
    corpus: o.corpus, heldOutSplit: o.heldOutSplit, settings: o.settings, result,
  };
  return { output, table: reportTable(output) };
}
