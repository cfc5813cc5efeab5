/**
 * Generates `tea-blends.tsv`: a made-up catalogue of spice and tea blend names, each a single
 * lower-case word (no spaces), with invented Zipf-like frequencies ("how often the blend was ordered").
 * Run `npx tsx datasets-demo/generate-tea-blends.ts` to rebuild it; seeded, so byte-for-byte repeatable.
 *
 * A name is a compound of two parts drawn from plain English words (tastes, colours, weather, places in
 * nature) and invented morphemes; some names get a plain ending such as "brew" or "leaf".
 */
import { createRng } from '../shared/data/random';
import { drawCategorical, formatTsv, hasAvoidedSubstring, isMainModule, writeDemoFiles, zipfCounts } from './demo-corpus-file';

export const TEA_SEED = 'tea-blends-v1';
export const TEA_TYPES = 800;

const PLAIN = [
  'amber', 'anise', 'ash', 'bark', 'berry', 'birch', 'bloom', 'blossom', 'brook', 'cedar', 'chai', 'cinder', 'citrus',
  'clove', 'cloud', 'copper', 'cream', 'dawn', 'dew', 'dusk', 'ember', 'fennel', 'fern', 'fig', 'frost', 'ginger',
  'glen', 'gold', 'harbour', 'hazel', 'heath', 'honey', 'juniper', 'lantern', 'lemon', 'linden', 'malt', 'maple',
  'meadow', 'mint', 'mist', 'moon', 'moss', 'nutmeg', 'oak', 'orchard', 'pepper', 'pine', 'plum', 'quince', 'rain',
  'river', 'rose', 'rust', 'saffron', 'sage', 'salt', 'silver', 'smoke', 'snow', 'spice', 'star', 'storm', 'sun',
  'thistle', 'thyme', 'tide', 'twilight', 'velvet', 'vale', 'willow', 'winter', 'wood', 'yarrow',
];
/** Invented morphemes (no meaning outside this catalogue). */
const INVENTED = [
  'zaro', 'quilla', 'mendi', 'oruva', 'tesh', 'kalo', 'brisl', 'vanto', 'ulme', 'dorra', 'pimsa', 'ketu', 'olva',
  'sarn', 'tivo', 'yemba', 'lurra', 'fenko', 'ishta', 'movi', 'rauka', 'selvi', 'tansa', 'wexa', 'azmi', 'nolu',
];
const ENDINGS: [string, number][] = [['', 0.7], ['brew', 0.08], ['leaf', 0.08], ['cup', 0.05], ['steep', 0.05], ['pot', 0.04]];
/** Kinds of compound: plain+plain, invented+plain, plain+invented, invented+invented. */
const KINDS: ['pp' | 'ip' | 'pi' | 'ii', number][] = [['pp', 0.45], ['ip', 0.25], ['pi', 0.2], ['ii', 0.1]];

function inventBlend(rng: ReturnType<typeof createRng>): string {
  const kind = drawCategorical(KINDS, rng);
  const first = kind[0] === 'p' ? rng.pick(PLAIN) : rng.pick(INVENTED);
  const second = kind[1] === 'p' ? rng.pick(PLAIN) : rng.pick(INVENTED);
  if (first === second) return '';
  return first + second + drawCategorical(ENDINGS, rng);
}

/** The invented blend names in rank order (most frequent first). */
export function inventBlendNames(count = TEA_TYPES, seed = TEA_SEED): string[] {
  const rng = createRng(seed).fork('names');
  const names = new Set<string>();
  let attempts = 0;
  while (names.size < count) {
    if (++attempts > count * 100) throw new Error(`Could only invent ${names.size} distinct blend names; add more parts.`);
    const name = inventBlend(rng);
    if (name.length >= 5 && name.length <= 22 && !/(.)\1\1/.test(name) && !hasAvoidedSubstring(name)) names.add(name);
  }
  return [...names];
}

/** The text of tea-blends.tsv. */
export function buildTeaBlendsTsv(): string {
  const names = inventBlendNames();
  return formatTsv(zipfCounts(names, { top: 1500, exponent: 0.9, jitter: 0.3 }, createRng(TEA_SEED).fork('counts')));
}

if (isMainModule(import.meta.url)) {
  await writeDemoFiles({ 'tea-blends.tsv': buildTeaBlendsTsv() });
}
