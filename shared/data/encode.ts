/**
 * Alphabet, encoding and decoding of words for the models (MODEL.md section 1).
 *
 * Characters are Unicode code points (a surrogate pair counts as one character). Id 0 is the
 * end-of-word symbol; id i (1..chars.length) is chars[i-1]. A word of n characters is encoded as
 * n character ids followed by EOW, so its length is T = n + 1.
 */

export const EOW_ID = 0;

/** One word type of a corpus with its count (a plain list means count 1 each). */
export interface WordCount {
  word: string;
  count: number;
}

export interface Alphabet {
  /** Distinct characters, sorted by code point. */
  chars: string[];
  /** Vocabulary size V = chars.length + 1 (the extra symbol is EOW). */
  size: number;
}

export interface EncodedBatch {
  words: string[];
  /** [batchSize * maxLen] row-major; padding = EOW_ID. */
  ids: Int32Array;
  /** [batchSize * maxLen] row-major; 1 where t < lengths[b], else 0. */
  mask: Float32Array;
  /** Characters + 1 (EOW) per word. */
  lengths: Int32Array;
  batchSize: number;
  maxLen: number;
}

/** Splits a word into characters (code points). */
export function charsOf(word: string): string[] {
  return Array.from(word);
}

function compareCodePoints(a: string, b: string): number {
  return (a.codePointAt(0) ?? 0) - (b.codePointAt(0) ?? 0);
}

/** The alphabet of a list of words: their distinct characters sorted by code point. */
export function buildAlphabet(words: readonly string[]): Alphabet {
  const seen = new Set<string>();
  for (const w of words) for (const c of w) seen.add(c);
  const chars = [...seen].sort(compareCodePoints);
  return { chars, size: chars.length + 1 };
}

/**
 * An alphabet from a given list of characters, e.g. the one stored in a checkpoint. The order is kept
 * as given (id i = chars[i-1]) so ids match the model that was trained with it. Validated: single
 * code points, no duplicates.
 */
export function alphabetFromChars(chars: readonly string[]): Alphabet {
  const seen = new Set<string>();
  for (const c of chars) {
    if (Array.from(c).length !== 1) {
      throw new Error(`Alphabet entry ${JSON.stringify(c)} is not a single character; list one character per entry.`);
    }
    if (seen.has(c)) throw new Error(`Alphabet lists ${JSON.stringify(c)} twice; list each character once.`);
    seen.add(c);
  }
  return { chars: [...chars], size: chars.length + 1 };
}

const indexCache = new WeakMap<Alphabet, Map<string, number>>();

/** Character -> id (1-based; EOW is 0). Cached per alphabet object. */
export function alphabetIndex(alphabet: Alphabet): Map<string, number> {
  let index = indexCache.get(alphabet);
  if (!index || index.size !== alphabet.chars.length) {
    index = new Map(alphabet.chars.map((c, i) => [c, i + 1]));
    indexCache.set(alphabet, index);
  }
  return index;
}

function describeChar(c: string): string {
  const cp = c.codePointAt(0) ?? 0;
  return `${JSON.stringify(c)} (U+${cp.toString(16).toUpperCase().padStart(4, '0')})`;
}

/** Ids of one word, EOW included (length = characters + 1). */
export function encodeWord(word: string, alphabet: Alphabet): Int32Array {
  const index = alphabetIndex(alphabet);
  const chars = charsOf(word);
  const out = new Int32Array(chars.length + 1);
  chars.forEach((c, t) => {
    const id = index.get(c);
    if (id === undefined) {
      throw new Error(
        `Word ${JSON.stringify(word)} has the character ${describeChar(c)}, which is not in the model's alphabet; ` +
          'normalise the word or drop it before encoding.',
      );
    }
    out[t] = id;
  });
  out[chars.length] = EOW_ID;
  return out;
}

/** Encodes words into padded, masked id arrays (row-major [batchSize, maxLen]). */
export function encodeBatch(words: readonly string[], alphabet: Alphabet): EncodedBatch {
  if (words.length === 0) throw new Error('Cannot encode an empty batch; pass at least one word.');
  const encoded = words.map((w) => encodeWord(w, alphabet));
  const batchSize = words.length;
  const maxLen = encoded.reduce((m, e) => Math.max(m, e.length), 0);
  const ids = new Int32Array(batchSize * maxLen); // zero-filled = EOW_ID padding
  const mask = new Float32Array(batchSize * maxLen);
  const lengths = new Int32Array(batchSize);
  encoded.forEach((e, b) => {
    ids.set(e, b * maxLen);
    mask.fill(1, b * maxLen, b * maxLen + e.length);
    lengths[b] = e.length;
  });
  return { words: words.slice(), ids, mask, lengths, batchSize, maxLen };
}

/** Characters of the ids up to (not including) the first EOW. Throws on an id outside the alphabet. */
export function decodeIds(ids: ArrayLike<number>, alphabet: Alphabet): string {
  let out = '';
  for (let t = 0; t < ids.length; t++) {
    const id = ids[t] as number;
    if (id === EOW_ID) break;
    if (!Number.isInteger(id) || id < 0 || id > alphabet.chars.length) {
      throw new Error(`Id ${id} at position ${t} is outside the alphabet (0..${alphabet.chars.length}).`);
    }
    out += alphabet.chars[id - 1];
  }
  return out;
}
