/** `npm run evaluate` as a function: load checkpoint + corpus, compute every §7 figure, return report and table. */
import { readFileSync } from 'node:fs';
import { decodeCheckpoint, type Checkpoint } from '../model/checkpoint';
import { initNodeBackend } from '../node/tf-node';
import type { EvaluationData, ExactEvaluation, SsmEvaluation } from '../eval/evaluation-report';
import { evaluateCheckpoint } from '../training/evaluation-job';
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
  const gruCk = ck.family === 'ssm' && o.gruBaseline ? readCheckpoint(o.gruBaseline) : null;
  if (gruCk && gruCk.family !== 'gru') throw new Error(`--baseline must be a GRU checkpoint (it holds a ${gruCk.family} model).`);
  if (gruCk && gruCk.alphabet.join('') !== ck.alphabet.join('')) throw new Error('The GRU baseline was trained with another alphabet; train it on the same corpus.');
  // The same steps as the evaluation worker (shared/training/evaluation-job.ts).
  const result = evaluateCheckpoint(ck, data, o.settings, o.ngramOrder, gruCk);
  const output: EvaluationOutput = {
    checkpoint: { path: o.checkpoint, family: ck.family, step: ck.step, settings: ck.settings, createdAt: ck.createdAt },
    corpus: o.corpus, heldOutSplit: o.heldOutSplit, settings: o.settings, result,
  };
  return { output, table: reportTable(output) };
}
