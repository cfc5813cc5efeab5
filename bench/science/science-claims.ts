/**
 * The claims of the method checked against the measured rows (decision rules fixed before any run; nothing is
 * tuned to pass), and docs/RESULTS.md written from them. Costs are positive, lower is better; bits per character
 * count the end-of-word symbol.
 */
import type { RowFigures } from './science-job';

export type Verdict = 'yes' | 'no' | 'partly' | 'not measured';

export interface Claim {
  id: string;
  claim: string;
  measured: string;
  verdict: Verdict;
}

interface GroupStats { mean: number; spread: number; n: number }

const f3 = (x: number) => x.toFixed(3);

function group(rows: RowFigures[], corpus: string, name: string, pick: (r: RowFigures) => number | null): GroupStats | null {
  const v = rows.filter((r) => r.corpus === corpus && r.group === name).map(pick).filter((x): x is number => x !== null && Number.isFinite(x));
  if (v.length === 0) return null;
  const mean = v.reduce((a, b) => a + b, 0) / v.length;
  return { mean, spread: Math.max(...v) - Math.min(...v), n: v.length };
}

const held = (r: RowFigures) => r.heldOutBitsPerChar;

/**
 * Paired difference `b − a` in held-out bits/char on the same words (same corpus and split seed), with its standard
 * error from the per-word differences: Σ(d)/Σ(chars) ± sd(d)/√n / mean(chars). Null without per-word figures.
 */
export function pairedDifference(a: RowFigures, b: RowFigures): { diff: number; se: number; words: number } | null {
  const pa = a.perWord;
  const pb = b.perWord;
  if (!pa || !pb || pa.bits.length !== pb.bits.length || pa.bits.length < 2) return null;
  const n = pa.bits.length;
  const d = pb.bits.map((x, i) => x - (pa.bits[i] as number));
  const meanD = d.reduce((s, x) => s + x, 0) / n;
  const sd = Math.sqrt(d.reduce((s, x) => s + (x - meanD) ** 2, 0) / (n - 1));
  const meanChars = pa.characters.reduce((s, x) => s + x, 0) / n;
  return { diff: meanD / meanChars, se: sd / Math.sqrt(n) / meanChars, words: n };
}

const rowOf = (rows: RowFigures[], corpus: string, group: string, seed: number) => rows.find((r) => r.corpus === corpus && r.group === group && r.seed === seed);

/** "paired per-word difference on the same N test words: +x ± se" for `b − a` of each seed both groups have. */
function pairedText(rows: RowFigures[], corpus: string, a: string, b: string): string {
  const parts = [1, 2, 3].flatMap((seed) => {
    const ra = rowOf(rows, corpus, a, seed);
    const rb = rowOf(rows, corpus, b, seed);
    const p = ra && rb ? pairedDifference(ra, rb) : null;
    return p ? [`seed ${seed}: ${p.diff >= 0 ? '+' : ''}${f3(p.diff)} ± ${f3(p.se)}`] : [];
  });
  return parts.length === 0 ? '' : `; paired per-word difference ${b} − ${a} on the same test words, ± standard error: ${parts.join(', ')}`;
}
const show = (g: GroupStats) => (g.n > 1 ? `${f3(g.mean)} (range ${f3(g.spread)} over ${g.n} seeds)` : f3(g.mean));

/** "Better" = lower cost; a difference inside the seed spread of SSM-8 counts as "partly". */
function ablation(rows: RowFigures[], id: string, claim: string, variant: string, variantLabel: string): Claim {
  const base = group(rows, 'names', 'SSM-8', held);
  const other = group(rows, 'names', variant, held);
  if (!base || !other) return { id, claim, measured: 'run not in this budget', verdict: 'not measured' };
  const diff = other.mean - base.mean;
  const verdict: Verdict = diff > Math.max(base.spread, 0) ? 'yes' : diff > 0 ? 'partly' : 'no';
  return {
    id, claim, verdict,
    measured: `names held-out bits/char: SSM-8 ${show(base)}, ${variantLabel} ${f3(other.mean)} (difference ${diff >= 0 ? '+' : ''}${f3(diff)})` +
      pairedText(rows, 'names', 'SSM-8', variant),
  };
}

export function checkClaims(rows: RowFigures[]): Claim[] {
  const claims: Claim[] = [];
  const ssmCe = group(rows, 'subtlex', 'SSM-8', (r) => r.crossEntropyBits);
  const gruCe = group(rows, 'subtlex', 'GRU-8', (r) => r.crossEntropyBits);
  const ssmNames = group(rows, 'names', 'SSM-8', held);
  const gruNames = group(rows, 'names', 'GRU-8', held);
  if (ssmCe && gruCe && ssmNames && gruNames) {
    const ceOk = ssmCe.mean <= gruCe.mean;
    const namesOk = ssmNames.mean <= gruNames.mean + 0.05;
    claims.push({
      id: 'a', claim: 'The stochastic model is on par with or better than a teacher-forced GRU of the same state size',
      measured: `SUBTLEX top-20k sequence cross entropy (bits/word): SSM-8 ${show(ssmCe)} (estimate: an upper bound in expectation) vs ` +
        `GRU-8 ${show(gruCe)} (exact); names held-out bits/char: SSM-8 ${show(ssmNames)} vs GRU-8 ${show(gruNames)} (target: within 0.05)` +
        pairedText(rows, 'names', 'GRU-8', 'SSM-8'),
      verdict: ceOk && namesOk ? 'yes' : ceOk || namesOk ? 'partly' : 'no',
    });
  } else {
    claims.push({ id: 'a', claim: 'The stochastic model is on par with or better than a teacher-forced GRU', measured: 'runs missing', verdict: 'not measured' });
  }
  claims.push(ablation(rows, 'b', 'A powerful generative flow is essential (default coupling, coupling, diag vs shift only)', 'SSM-8 gen shift', 'shift-only generative flow'));
  claims.push(ablation(rows, 'c', 'Importance-weighted bounds improve results (trained with K 8 vs K 1)', 'SSM-8 K1', 'K 1 (ELBO)'));
  claims.push(ablation(rows, 'd', 'The inference flow should be slightly less powerful than the generative one (diag vs the generative stack)',
    'SSM-8 inf coupling', 'inference flow as powerful as the generative one'));

  const ssmRows = rows.filter((r) => r.group === 'SSM-8' && r.noiseInformationPerStep);
  if (ssmRows.length > 0) {
    const parts = ssmRows.map((r) => {
      const steps = (r.noiseInformationPerStep ?? []).filter((p) => p.n >= 5);
      const min = Math.min(...steps.map((p) => p.mean));
      const first = steps[0]?.mean ?? 0;
      const highestFirst = steps.every((p) => p.mean <= first);
      return { r, min, first, highestFirst, used: min > 0.01 };
    });
    const used = parts.every((p) => p.used);
    const firstHighest = parts.every((p) => p.highestFirst);
    claims.push({
      id: 'e', claim: 'The noise is never ignored, and its mutual information is highest at the first step',
      measured: parts.map((p) => `${p.r.corpus} seed ${p.r.seed}: I_1 ${f3(p.first)} bits, smallest per-position mean ${f3(p.min)} bits` +
        `${p.highestFirst ? ', first is highest' : ', first is not highest'}`).join('; ') + ' (positions with ≥ 5 words)',
      verdict: used && firstHighest ? 'yes' : used || firstHighest ? 'partly' : 'no',
    });
  } else {
    claims.push({ id: 'e', claim: 'The noise is never ignored; MI highest at the first step', measured: 'runs missing', verdict: 'not measured' });
  }

  const withBase = rows.filter((r) => r.group === 'SSM-8' && r.observationEntropyBits !== null && r.gruPredictiveEntropyBits !== null);
  if (withBase.length > 0) {
    const lower = withBase.filter((r) => (r.observationEntropyBits as number) < (r.gruPredictiveEntropyBits as number));
    claims.push({
      id: 'f', claim: 'The observation entropy is lower than the baseline GRU\'s predictive entropy',
      measured: withBase.map((r) => `${r.corpus} seed ${r.seed}: SSM-8 ${f3(r.observationEntropyBits as number)} vs GRU-8 ` +
        `${f3(r.gruPredictiveEntropyBits as number)} bits`).join('; '),
      verdict: lower.length === withBase.length ? 'yes' : lower.length > 0 ? 'partly' : 'no',
    });
  } else {
    claims.push({ id: 'f', claim: 'Observation entropy lower than the GRU\'s', measured: 'runs missing', verdict: 'not measured' });
  }

  const s8 = group(rows, 'names', 'SSM-8', held);
  const s16 = group(rows, 'names', 'SSM-16', held);
  const s32 = group(rows, 'names', 'SSM-32', held);
  if (s8 && s16) {
    const sizes = [s8, s16, ...(s32 ? [s32] : [])];
    const ordered = sizes.every((g, i) => i === 0 || g.mean < (sizes[i - 1] as GroupStats).mean);
    claims.push({
      id: 'size', claim: 'A larger state helps: SSM-32 < SSM-16 < SSM-8 (held-out, names)',
      measured: `SSM-8 ${f3(s8.mean)}, SSM-16 ${f3(s16.mean)}${s32 ? `, SSM-32 ${f3(s32.mean)}` : ' (SSM-32 not in this budget)'} bits/char`,
      verdict: ordered ? (s32 ? 'yes' : 'partly') : 'no',
    });
  }
  return claims;
}
