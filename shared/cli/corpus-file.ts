/** Reading a corpus file for the command line: DATA's parser (normalisation, per-line problems) and the splits. */
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { parseCorpus, type ParseOptions } from '../data/corpus-parse';
import type { Alphabet, WordCount } from '../data/encode';
import { alphabetFromChars } from '../data/encode';
import { splitCorpus, type SplitShares } from '../data/split';

export interface LoadedCorpus {
  words: WordCount[];
  alphabet: Alphabet;
  parts: { train: WordCount[]; validation: WordCount[]; test: WordCount[] };
  warnings: string[];
}

export function loadCorpus(path: string, opts: { splitSeed: number; shares: SplitShares; parse?: ParseOptions }): LoadedCorpus {
  let bytes: Uint8Array;
  try {
    bytes = readFileSync(path);
  } catch (e) {
    throw new Error(`Cannot read the corpus file "${path}" (${(e as NodeJS.ErrnoException).code ?? (e as Error).message}); check the path.`);
  }
  const parsed = parseCorpus(bytes, { fileName: basename(path), mergeDuplicates: true, ...opts.parse });
  const errors = parsed.problems.filter((p) => p.severity === 'error');
  if (!parsed.ok) {
    const list = errors.slice(0, 10).map((p) => `  - ${p.message}`).join('\n');
    throw new Error(`The corpus "${path}" has ${parsed.errorCount} error(s); fix them and run again:\n${list}`);
  }
  if (parsed.words.length === 0) throw new Error(`The corpus "${path}" has no words after normalisation.`);
  const { parts } = splitCorpus(parsed.words, opts.splitSeed, opts.shares);
  return {
    words: parsed.words,
    alphabet: parsed.alphabet,
    parts,
    warnings: parsed.problems.filter((p) => p.severity !== 'error').slice(0, 10).map((p) => p.message),
  };
}

/** The alphabet a checkpoint was trained with; every corpus word must fit it. */
export function checkWordsFit(words: readonly WordCount[], chars: readonly string[]): Alphabet {
  const alphabet = alphabetFromChars(chars);
  const known = new Set(chars);
  const bad = words.filter((w) => Array.from(w.word).some((c) => !known.has(c)));
  if (bad.length > 0) {
    throw new Error(`${bad.length} corpus word(s) use characters the model never saw (e.g. "${bad[0]?.word}"); ` +
      `evaluate on the corpus the model was trained on (its characters: "${chars.join('')}").`);
  }
  return alphabet;
}
