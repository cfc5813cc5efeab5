/**
 * The ablation table of the training-recipe study (docs/RESULTS.md) from the lines `recipe-study.ts` wrote:
 *   npx tsx bench/science/recipe-table.ts bench/results/recipe-study.jsonl
 * Prints Markdown: one row per arm with its settings that differ from the defaults, held-out bits/char (IWAE bound,
 * every test word, end-of-word counted) ± standard error, bits/word, noise MI, observation entropy and step time.
 * Paired differences against a reference arm (same seed and steps) use the per-word figures (`.words` file) when both
 * arms have them.
 */
import { existsSync, readFileSync } from 'node:fs';
import { STUDY_START } from './recipe-arms';

interface Row {
  label: string; steps: number; seed: number; arm: Record<string, number | string>; msPerStep: number; evalK: number; repeats: number;
  heldOutBitsPerChar: number; heldOutBitsPerWord: number; se: number; miBitsPerStep: number; miFirst: number; miByPosition: number[];
  observationEntropyBits: number; trainCurve: number[]; words: number;
}

const file = process.argv[2] ?? 'bench/results/recipe-study.jsonl';
const rows = readFileSync(file, 'utf8').trim().split('\n').map((l) => JSON.parse(l) as Row);
const perWord = new Map<string, number[]>();
if (existsSync(`${file}.words`)) {
  for (const l of readFileSync(`${file}.words`, 'utf8').trim().split('\n')) {
    const { label, bits } = JSON.parse(l) as { label: string; bits: number[] };
    perWord.set(label, bits);
  }
}
/** The arms' starting point: a row lists only what it changed from this. */
const NEUTRAL: Record<string, number | string> = { ...STUDY_START };
const changed = (r: Row) => Object.entries(r.arm).filter(([k, v]) => k in NEUTRAL && NEUTRAL[k] !== v).map(([k, v]) => `${k} ${v}`).join(', ') || 'defaults';

/**
 * Paired difference of arm b minus arm a over the same words: mean per word ± its standard error, divided by the
 * mean steps per word (bits/word ÷ bits/char of a: a ratio of sums, so this is the bits/char difference).
 */
function paired(a: number[], b: number[], stepsPerWord: number): { diff: number; se: number } {
  const d = a.map((x, i) => (b[i] as number) - x);
  const mean = d.reduce((s, x) => s + x, 0) / d.length;
  const varD = d.reduce((s, x) => s + (x - mean) ** 2, 0) / (d.length - 1);
  return { diff: mean / stepsPerWord, se: Math.sqrt(varD / d.length) / stepsPerWord };
}

console.log('| arm | changed from the defaults | seed | steps | ms/step | held-out bits/char (bound) | bits/word | MI/step (first) | observation entropy |');
console.log('|---|---|---:|---:|---:|---|---:|---|---:|');
for (const r of rows) {
  console.log(`| ${r.label} | ${changed(r)} | ${r.seed} | ${r.steps} | ${r.msPerStep.toFixed(0)} | ${r.heldOutBitsPerChar.toFixed(3)} ± ${r.se.toFixed(3)} | ` +
    `${r.heldOutBitsPerWord.toFixed(2)} | ${r.miBitsPerStep.toFixed(2)} (${r.miFirst.toFixed(2)}) | ${r.observationEntropyBits.toFixed(2)} |`);
}
const ref = process.argv[3];
if (ref && perWord.has(ref)) {
  const base = perWord.get(ref) as number[];
  const first = rows.find((r) => r.label === ref) as Row;
  for (const [label, bits] of perWord) {
    const row = rows.find((r) => r.label === label);
    // Only arms trained from the same seed for the same steps: across seeds the difference is mostly the seed's.
    if (label === ref || !row || row.seed !== first.seed || row.steps !== first.steps) continue;
    const p = paired(base, bits, first.heldOutBitsPerWord / first.heldOutBitsPerChar);
    console.log(`paired ${label} − ${ref}: ${p.diff >= 0 ? '+' : ''}${p.diff.toFixed(4)} ± ${p.se.toFixed(4)} bits/char`);
  }
}
