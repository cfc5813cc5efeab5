/** A separate file of held-out words (`train --validation-file`, `evaluate --held-out-file`). */
import type { Alphabet, WordCount } from '../data/encode';
import { loadCorpus } from './corpus-file';

/**
 * Every word of `path` (same normalisation as the corpus), checked against the model's alphabet: a word with a
 * character the model cannot emit is an error that names the word and the option to change.
 */
export function loadHeldOutFile(path: string, alphabet: Alphabet, o: { keepCase: boolean; option: string }): WordCount[] {
  const file = loadCorpus(path, {
    splitSeed: 1, shares: { train: 1, validation: 0, test: 0 },
    parse: { normalise: { lowerCase: !o.keepCase, nfc: true, stripDiacritics: false, outsideAlphabet: 'drop-word' } },
  });
  const known = new Set(alphabet.chars);
  const bad = file.words.filter((w) => Array.from(w.word).some((c) => !known.has(c)));
  if (bad.length > 0) {
    throw new Error(`${bad.length} word(s) of ${o.option} "${path}" use characters outside the model's alphabet ` +
      `(e.g. "${bad[0]?.word}"); the model knows only "${alphabet.chars.join('')}". Remove those words from the file.`);
  }
  return file.words;
}
