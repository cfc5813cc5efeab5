/**
 * What a checkpoint records about the words its model was trained on, so that an evaluation can rebuild exactly
 * those words (for the n-gram baseline and the split) and notice when it cannot.
 */
import type { WordCount } from './encode';
import { fnv1a32, type SplitShares } from './split';

export interface TrainingWordsRecord {
  /** File name of the corpus (no folders). */
  corpus: string;
  splitSeed: number;
  shares: SplitShares;
  keepCase: boolean;
  allowedChars: string | null;
  /** Word types and tokens of the training split. */
  types: number;
  tokens: number;
  /** Hash of the sorted "word<TAB>count" lines of the training split (FNV-1a 32, hex). */
  digest: string;
  /** File name of a separate validation file, when one was used. */
  validationFile: string | null;
}

export function trainingWordsDigest(words: readonly WordCount[]): string {
  const lines = words.map((w) => `${w.word}\t${w.count}`).sort();
  return fnv1a32(new TextEncoder().encode(lines.join('\n'))).toString(16).padStart(8, '0');
}

export function trainingWordsRecord(words: readonly WordCount[], rest: Omit<TrainingWordsRecord, 'types' | 'tokens' | 'digest'>): TrainingWordsRecord {
  return { ...rest, types: words.length, tokens: words.reduce((s, w) => s + w.count, 0), digest: trainingWordsDigest(words) };
}

/** Reads a record from a checkpoint header (unknown JSON); null when absent or malformed (older checkpoints). */
export function readTrainingWordsRecord(x: unknown): TrainingWordsRecord | null {
  const r = x as Partial<TrainingWordsRecord> | null | undefined;
  if (!r || typeof r !== 'object' || typeof r.digest !== 'string' || typeof r.splitSeed !== 'number' || !r.shares
    || typeof r.shares.train !== 'number' || typeof r.types !== 'number') return null;
  return {
    corpus: String(r.corpus ?? ''), splitSeed: r.splitSeed, shares: { ...r.shares }, keepCase: r.keepCase === true,
    allowedChars: typeof r.allowedChars === 'string' ? r.allowedChars : null, types: r.types, tokens: Number(r.tokens ?? 0),
    digest: r.digest, validationFile: typeof r.validationFile === 'string' ? r.validationFile : null,
  };
}
