/**
 * Generates `archipelago-places.tsv`: invented place names of an invented archipelago, with invented
 * Zipf-like frequencies. Run `npx tsx datasets-demo/generate-archipelago.ts` to rebuild the file; the
 * output is the same byte for byte on every run (seeded).
 *
 * The invented language: a name is [an optional direction/size prefix] + a root of one or two
 * syllables + a place-kind ending. The morphemes and their "meanings" are made up for this corpus.
 */
import { createRng } from '../shared/data/random';
import { drawCategorical, formatTsv, hasAvoidedSubstring, isMainModule, writeDemoFiles, zipfCounts } from './demo-corpus-file';

export const ARCHIPELAGO_SEED = 'archipelago-places-v1';
export const ARCHIPELAGO_TYPES = 3000;

/** Optional prefixes: ul- "upper", ves- "lower", kel- "little", tam- "great", ord- "outer". */
const PREFIXES: [string, number][] = [['', 0.78], ['ul', 0.05], ['ves', 0.05], ['kel', 0.04], ['tam', 0.04], ['ord', 0.04]];
const ONSETS: [string, number][] = [
  ['b', 0.06], ['d', 0.07], ['f', 0.05], ['g', 0.05], ['h', 0.06], ['k', 0.08], ['l', 0.08], ['m', 0.07],
  ['n', 0.06], ['r', 0.06], ['s', 0.07], ['t', 0.07], ['v', 0.05], ['th', 0.04], ['sk', 0.03], ['br', 0.03],
  ['dr', 0.02], ['gl', 0.02], ['kr', 0.02], ['', 0.03],
];
const VOWELS: [string, number][] = [['a', 0.26], ['e', 0.2], ['i', 0.16], ['o', 0.18], ['u', 0.1], ['ei', 0.05], ['au', 0.05]];
const CODAS: [string, number][] = [['', 0.55], ['n', 0.1], ['r', 0.1], ['l', 0.08], ['s', 0.06], ['th', 0.04], ['m', 0.04], ['k', 0.03]];
/** Place-kind endings: -vey "isle", -orrin "harbour", -mok "hill", -sella "bay", -drun "rock", -hame
 * "farmstead", -ith "spring", -ula "shore", -karn "cape", -pell "bridge", -wyn "meadow", -essa "sound". */
const ENDINGS: [string, number][] = [
  ['vey', 0.14], ['orrin', 0.1], ['mok', 0.09], ['sella', 0.09], ['drun', 0.08], ['hame', 0.09], ['ith', 0.08],
  ['ula', 0.07], ['karn', 0.07], ['pell', 0.06], ['wyn', 0.07], ['essa', 0.06],
];

const VOWEL = /[aeiou]$/;
const STARTS_VOWEL = /^[aeiou]/;

function joinMorphemes(left: string, right: string): string {
  if (left === '') return right;
  if (VOWEL.test(left) && STARTS_VOWEL.test(right)) return `${left}r${right}`; // linking r between vowels
  if (!VOWEL.test(left) && !STARTS_VOWEL.test(right)) return `${left}e${right}`; // linking e between consonants
  return left + right;
}

/** Pronounceable: no three consonants or three vowels in a row, no doubled letter pairs like "kk" at the start. */
function pronounceable(name: string): boolean {
  return !/[^aeiou]{3}/.test(name) && !/[aeiou]{3}/.test(name) && !/^(.)\1/.test(name) && !/(.)\1\1/.test(name);
}

function inventName(rng: ReturnType<typeof createRng>): string {
  const syllables = rng.next() < 0.6 ? 1 : 2;
  let root = '';
  for (let i = 0; i < syllables; i++) {
    const coda = i === syllables - 1 ? drawCategorical(CODAS, rng) : '';
    root += drawCategorical(ONSETS, rng) + drawCategorical(VOWELS, rng) + coda;
  }
  const prefix = drawCategorical(PREFIXES, rng);
  return joinMorphemes(joinMorphemes(prefix, root), drawCategorical(ENDINGS, rng));
}

/** The invented names in rank order (most frequent first). */
export function inventPlaceNames(count = ARCHIPELAGO_TYPES, seed = ARCHIPELAGO_SEED): string[] {
  const rng = createRng(seed).fork('names');
  const names = new Set<string>();
  let attempts = 0;
  while (names.size < count) {
    if (++attempts > count * 200) throw new Error(`Could only invent ${names.size} distinct place names; widen the morpheme lists.`);
    const name = inventName(rng);
    if (name.length >= 3 && name.length <= 14 && pronounceable(name) && !hasAvoidedSubstring(name)) names.add(name);
  }
  return [...names];
}

/** The text of archipelago-places.tsv. */
export function buildArchipelagoTsv(): string {
  const names = inventPlaceNames();
  return formatTsv(zipfCounts(names, { top: 4000, exponent: 1.0, jitter: 0.25 }, createRng(ARCHIPELAGO_SEED).fork('counts')));
}

if (isMainModule(import.meta.url)) {
  await writeDemoFiles({ 'archipelago-places.tsv': buildArchipelagoTsv() });
}
