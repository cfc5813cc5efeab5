/**
 * Deterministic train / validation / test splits (MODEL.md section 1).
 *
 * A word's split depends only on the word, the split seed and the shares: we hash the UTF-8 bytes of
 * `<seed in decimal> 0xFF <word>` with 32-bit FNV-1a (Fowler–Noll–Vo, offset basis 2166136261, prime
 * 16777619), then apply MurmurHash3's 32-bit finaliser ("fmix32") so that similar words spread evenly,
 * and read the result as u = h / 2^32 in [0, 1). The split is train if u < train, validation if
 * u < train + validation, else test. The 0xFF byte never occurs in UTF-8, so seed and word cannot run
 * into each other.
 */
import type { WordCount } from './encode';

export type SplitName = 'train' | 'validation' | 'test';
export interface SplitShares {
  train: number;
  validation: number;
  test: number;
}

export const SPLIT_NAMES: readonly SplitName[] = ['train', 'validation', 'test'];
export const DEFAULT_SPLIT_SHARES: Readonly<SplitShares> = Object.freeze({ train: 0.8, validation: 0.1, test: 0.1 });

const encoder = new TextEncoder();

function fnv1aStep(h: number, byte: number): number {
  return Math.imul(h ^ byte, 16777619) >>> 0;
}

/** 32-bit FNV-1a over bytes, starting from `h` (default: the offset basis). */
export function fnv1a32(bytes: Uint8Array, h = 2166136261): number {
  let x = h >>> 0;
  for (let i = 0; i < bytes.length; i++) x = fnv1aStep(x, bytes[i] as number);
  return x;
}

/** MurmurHash3's 32-bit finaliser (avalanche mix). */
export function fmix32(h: number): number {
  let x = h >>> 0;
  x ^= x >>> 16;
  x = Math.imul(x, 0x85ebca6b) >>> 0;
  x ^= x >>> 13;
  x = Math.imul(x, 0xc2b2ae35) >>> 0;
  x ^= x >>> 16;
  return x >>> 0;
}

/** Throws a clear error unless every share is in [0, 1] and they sum to 1 (within 1e-9). */
export function validateShares(shares: SplitShares): void {
  for (const name of SPLIT_NAMES) {
    const v = shares?.[name];
    if (typeof v !== 'number' || !Number.isFinite(v) || v < 0 || v > 1) {
      throw new Error(`The ${name} share must be a number between 0 and 1; got ${String(v)}.`);
    }
  }
  const sum = shares.train + shares.validation + shares.test;
  if (Math.abs(sum - 1) > 1e-9) {
    throw new Error(
      `Split shares must add up to 1; train ${shares.train} + validation ${shares.validation} + test ${shares.test} = ${sum}.`,
    );
  }
}

function validateSeed(seed: number): void {
  if (!Number.isSafeInteger(seed)) throw new Error(`The split seed must be a whole number; got ${seed}.`);
}

/** The hash state after the seed and the 0xff separator, for the last seed asked for (a corpus uses one). */
let seedState: { seed: number; h: number } | null = null;
/** Scratch bytes for a word's UTF-8 form (grown on demand): no new array per word. */
let wordBytes = new Uint8Array(256);

/** The position of a word in [0, 1) for a seed (the hash described above). */
export function splitPosition(word: string, seed: number): number {
  validateSeed(seed);
  if (seedState?.seed !== seed) seedState = { seed, h: fnv1aStep(fnv1a32(encoder.encode(String(seed))), 0xff) };
  // At most 3 UTF-8 bytes per UTF-16 unit: the scratch array always fits the whole word.
  if (wordBytes.length < word.length * 3) wordBytes = new Uint8Array(word.length * 3);
  const { written } = encoder.encodeInto(word, wordBytes);
  return fmix32(fnv1a32(wordBytes.subarray(0, written), seedState.h)) / 4294967296;
}

function splitAt(u: number, shares: SplitShares): SplitName {
  if (u < shares.train) return 'train';
  if (u < shares.train + shares.validation) return 'validation';
  if (shares.test > 0) return 'test';
  // Only reached through rounding when the test share is 0: never put a word in an empty split.
  return shares.validation > 0 ? 'validation' : 'train';
}

/** The split of one word. */
export function splitOf(word: string, seed: number, shares: SplitShares): SplitName {
  validateShares(shares);
  return splitAt(splitPosition(word, seed), shares);
}

export interface SplitCount {
  types: number;
  tokens: number;
}

/** Words of each split (input order kept) and their type/token counts. */
export function splitCorpus(
  words: readonly WordCount[],
  seed: number,
  shares: SplitShares,
): { parts: Record<SplitName, WordCount[]>; counts: Record<SplitName, SplitCount> } {
  validateShares(shares);
  validateSeed(seed);
  const parts: Record<SplitName, WordCount[]> = { train: [], validation: [], test: [] };
  const counts: Record<SplitName, SplitCount> = {
    train: { types: 0, tokens: 0 },
    validation: { types: 0, tokens: 0 },
    test: { types: 0, tokens: 0 },
  };
  for (const wc of words) {
    const name = splitAt(splitPosition(wc.word, seed), shares);
    parts[name].push(wc);
    counts[name].types++;
    counts[name].tokens += wc.count;
  }
  return { parts, counts };
}

/** Type/token counts per split. */
export function splitCounts(words: readonly WordCount[], seed: number, shares: SplitShares): Record<SplitName, SplitCount> {
  return splitCorpus(words, seed, shares).counts;
}
