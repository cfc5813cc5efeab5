/**
 * Helpers shared by the demo-corpus generators: invented Zipf-like counts, the .tsv layout, and writing
 * the file when a generator is run as a script. Building a file's text is pure (no Node), so the tests
 * can regenerate every file in memory and compare it with the committed one byte for byte.
 */
import type { WordCount } from '../shared/data/encode';
import type { Rng } from '../shared/data/random';

export interface ZipfOptions {
  /** Count of the most frequent word before jitter. */
  top: number;
  /** Zipf exponent s in count ∝ 1 / rank^s. */
  exponent: number;
  /** Standard deviation of the log-normal jitter applied to each count (0 = exact Zipf). */
  jitter: number;
}

/**
 * Gives the words (in the given order = their rank) invented Zipf-like counts:
 * max(1, round(top / rank^s * exp(jitter * N(0,1)))).
 */
export function zipfCounts(words: readonly string[], opts: ZipfOptions, rng: Rng): WordCount[] {
  return words.map((word, i) => ({
    word,
    count: Math.max(1, Math.round((opts.top / (i + 1) ** opts.exponent) * Math.exp(opts.jitter * rng.normal()))),
  }));
}

/** The .tsv text: header `word<TAB>count`, most frequent first, ties by code-point order, final newline. */
export function formatTsv(words: readonly WordCount[]): string {
  const sorted = [...words].sort((a, b) => b.count - a.count || (a.word < b.word ? -1 : a.word > b.word ? 1 : 0));
  return `word\tcount\n${sorted.map((w) => `${w.word}\t${w.count}`).join('\n')}\n`;
}

/**
 * Letter sequences a generated name must not contain (offensive English substrings). Generators reject
 * such names and draw again; this is a courtesy filter, not a guarantee (see the README caution).
 */
const AVOIDED = ['fag', 'nig', 'rape', 'kill', 'shit', 'cum', 'sex', 'nazi', 'cunt', 'fuck', 'slut', 'dick', 'piss', 'kkk'];

export function hasAvoidedSubstring(name: string): boolean {
  return AVOIDED.some((bad) => name.includes(bad));
}

/** Draws from a categorical distribution given as [value, probability] pairs (probabilities sum to 1). */
export function drawCategorical<T>(items: readonly (readonly [T, number])[], rng: Rng): T {
  let u = rng.next();
  for (const [value, p] of items) {
    if (u < p) return value;
    u -= p;
  }
  return (items[items.length - 1] as readonly [T, number])[0];
}

/** True when the module at `moduleUrl` is the script being run (`npx tsx datasets-demo/<file>.ts`). */
export function isMainModule(moduleUrl: string): boolean {
  const arg = globalThis.process?.argv?.[1];
  if (!arg) return false;
  const path = new URL(moduleUrl).pathname;
  return path === arg || path.endsWith(arg.replace(/^\.\//, '/'));
}

/** Writes files next to this module (Node only; imported lazily so the builders stay framework-free). */
export async function writeDemoFiles(files: Record<string, string>): Promise<void> {
  const { writeFile } = await import('node:fs/promises');
  for (const [name, text] of Object.entries(files)) {
    const url = new URL(`./${name}`, import.meta.url);
    await writeFile(url, text, 'utf8');
    console.log(`wrote datasets-demo/${name} (${text.length} characters)`);
  }
}
