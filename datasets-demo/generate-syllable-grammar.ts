/**
 * Generates `syllable-grammar.tsv` (counts of 50,000 words sampled from the grammar in
 * syllable-grammar.ts, seeded) and `syllable-grammar.entropy.json` (the grammar's exact word entropy).
 * Run `npx tsx datasets-demo/generate-syllable-grammar.ts`; byte-for-byte repeatable.
 */
import { createRng } from '../shared/data/random';
import { formatTsv, isMainModule, writeDemoFiles } from './demo-corpus-file';
import { SYLLABLE_GRAMMAR, exactEntropy, sampleCounts } from './syllable-grammar';

export const SYLLABLE_SEED = 'syllable-grammar-v1';
export const SYLLABLE_TOKENS = 50_000;

export function buildSyllableGrammarTsv(): string {
  const counts = sampleCounts(SYLLABLE_TOKENS, createRng(SYLLABLE_SEED).fork('sample'));
  return formatTsv([...counts].map(([word, count]) => ({ word, count })));
}

export function buildSyllableEntropyJson(): string {
  const e = exactEntropy(SYLLABLE_GRAMMAR);
  const round = (x: number) => Number(x.toPrecision(15));
  const doc = {
    description: 'Exact entropy of the word distribution of the grammar in syllable-grammar.ts (derivations of the same word merged).',
    wordEntropyBits: round(e.bits),
    wordEntropyNats: round(e.nats),
    wordTypes: e.types,
    derivations: e.derivations,
    derivationEntropyBits: round(e.derivationBits),
    varianceOfSurprisalBits2: round(e.varianceOfSurprisalBits2),
    sampledTokens: SYLLABLE_TOKENS,
    seed: SYLLABLE_SEED,
    grammar: SYLLABLE_GRAMMAR,
  };
  return `${JSON.stringify(doc, null, 2)}\n`;
}

if (isMainModule(import.meta.url)) {
  await writeDemoFiles({
    'syllable-grammar.tsv': buildSyllableGrammarTsv(),
    'syllable-grammar.entropy.json': buildSyllableEntropyJson(),
  });
}
