/** The evaluation as a plain-text table (figure, value, unit), numbers right-aligned. */
import { BITS_PER_CHAR as BPC } from '../api/figure-names';
import type { EvaluationOutput } from './evaluate-run';
import type { HeldOutFigures } from '../eval/baseline-figures';
import type { BaselineFigures } from '../eval/evaluation-report';

type Row = [string, string, string] | null;

const se = (x: number | null | undefined, digits: number) => (x === undefined ? null : `± ${f(x, digits)}`);

/** Held-out rows of one model: bits/char and bits/word, each with its standard error when known. */
function heldOutRows(label: string, h: HeldOutFigures): Row[] {
  const e = h.standardError;
  return [
    [label, `${f(h.bitsPerChar)}${e ? ` ${se(e.bitsPerChar, 3)}` : ''}`, BPC],
    [label, `${f(h.bitsPerWord, 2)}${e ? ` ${se(e.bitsPerWord, 2)}` : ''}`, 'bits/word'],
  ];
}

const f = (x: number | undefined | null, digits = 3) => (x === undefined || x === null || !Number.isFinite(x) ? '—' : x.toFixed(digits));
const pct = (x: number) => (x > 0 && x < 0.001 ? (100 * x).toExponential(1) : (100 * x).toFixed(1));

function baselineRows(b: BaselineFigures): Row[] {
  const rows: Row[] = [...heldOutRows('Unigram characters: held-out (exact)', b.unigram)];
  if (b.ngram) {
    rows.push(...heldOutRows(`Kneser–Ney ${b.ngram.order}-gram: held-out (exact)`, b.ngram));
    rows.push([`Kneser–Ney ${b.ngram.order}-gram: sequence cross entropy (exact)`, f(b.ngram.crossEntropy.crossEntropyBits, 2), 'bits/word']);
  }
  if (b.gru) {
    rows.push(...heldOutRows('GRU baseline: held-out (exact)', b.gru));
    rows.push(['GRU baseline: sequence cross entropy (exact)', f(b.gru.crossEntropy.crossEntropyBits, 2), 'bits/word']);
    rows.push(['GRU baseline: predictive entropy', f(b.gru.predictiveEntropy.meanBits), 'bits/step']);
  }
  return rows;
}

export function reportTable(out: EvaluationOutput): string {
  const r = out.result;
  const rows: Row[] = [];
  if (r.family === 'ssm') {
    const t = r.tight;
    const e = t.standardError;
    rows.push([`Tight estimate, a bound (IWAE, K = ${t.k}, ${t.repeats} repeats)`, `${f(t.bitsPerChar)}${e ? ` ${se(e.bitsPerChar.total, 3)}` : ''}`, BPC]);
    rows.push([`Tight estimate, a bound (IWAE, K = ${t.k}, ${t.repeats} repeats)`, `${f(t.bitsPerWord, 2)}${e ? ` ${se(e.bitsPerWord.total, 2)}` : ''}`, 'bits/word']);
    if (e) {
      rows.push(['  of which from the per-word spread', f(e.bitsPerChar.words, 4), BPC]);
      rows.push(['  of which from the repeats', f(e.bitsPerChar.repeats, 4), BPC]);
    }
    const ce = r.crossEntropy;
    rows.push([`Sequence cross entropy (S = ${ce.samples} shared trajectories)`, f(ce.shared.crossEntropyBits, 2), 'bits/word']);
    if (ce.iwae) rows.push([`Sequence cross entropy (IWAE, K = ${ce.iwaeK})`, f(ce.iwae.crossEntropyBits, 2), 'bits/word']);
    rows.push(['Corpus entropy H(p_data)', f(ce.shared.dataEntropyBits, 2), 'bits/word']);
    rows.push(['KL gap (shared trajectories)', f(ce.shared.klGapBits, 2), 'bits/word']);
    if (ce.iwae) rows.push(['KL gap (IWAE)', f(ce.iwae.klGapBits, 2), 'bits/word']);
    rows.push(['Model mass on the corpus words', pct(ce.shared.modelMass), '%']);
    rows.push([`Noise mutual information, mean (M = ${r.noise.draws}; max ${f(r.noise.maxBits, 2)})`, f(r.noise.meanBits), 'bits/step']);
    for (const p of r.noise.perPosition.slice(0, 12)) {
      rows.push([`  step ${p.t}: median [q1, q3] over ${p.n} words`, `${f(p.median)} [${f(p.q1)}, ${f(p.q3)}]`, 'bits']);
    }
    rows.push(['Observation entropy along posterior paths', f(r.observationEntropy.meanBits), 'bits/step']);
    const s = r.samples;
    rows.push([`Samples (${s.count}): training words`, pct(s.shares.train), '%']);
    rows.push(['Samples: held-out words', pct(s.shares.heldOut), '%']);
    rows.push(['Samples: novel words', pct(s.shares.novel), '%']);
    rows.push(['Samples cut at Tmax', String(s.truncated), 'samples']);
    rows.push(['Most frequent samples', s.top.slice(0, 6).map((x) => `${x.word || '(empty)'}×${x.count}`).join(' '), '']);
    for (const c of r.completions) {
      rows.push([`Completion of "${c.prefix}" (log p(prefix) ${f(c.logPrefix / Math.LN2, 2)} bits)`,
        c.continuations.slice(0, 5).map((x) => `${x.word}${x.ended ? '' : '…'} ${pct(x.weight)}%`).join(', '), '']);
    }
  } else {
    rows.push(...heldOutRows(`${r.family === 'gru' ? 'GRU' : 'Kneser–Ney n-gram'}: held-out (exact)`, r.heldOut));
    rows.push(['Sequence cross entropy (exact)', f(r.crossEntropy.crossEntropyBits, 2), 'bits/word']);
    rows.push(['Corpus entropy H(p_data)', f(r.crossEntropy.dataEntropyBits, 2), 'bits/word']);
    rows.push(['KL gap', f(r.crossEntropy.klGapBits, 2), 'bits/word']);
    rows.push(['Model mass on the corpus words', pct(r.crossEntropy.modelMass), '%']);
    if (r.predictiveEntropy) rows.push(['Predictive entropy', f(r.predictiveEntropy.meanBits), 'bits/step']);
  }
  rows.push(...baselineRows(r.baselines));
  const all = rows.filter((x): x is [string, string, string] => x !== null);
  const body = all.filter((x) => x[2] !== '');
  const notes = all.filter((x) => x[2] === '');
  const w0 = Math.max(...body.map((x) => x[0].length));
  const w1 = Math.max(...body.map((x) => x[1].length));
  const head = `Evaluation of ${out.checkpoint.path} (${out.checkpoint.family}, step ${out.checkpoint.step}) on ${out.corpus}, ${out.heldOutSplit}${out.heldOutSplit.startsWith('file') ? '' : ' split'}`;
  const about = [`Held-out: ${out.data.heldOut}; ${out.data.note}.`, `Baselines fitted on ${out.data.trainingWords}.`,
    'Figures are positive costs (lower is better); ± is a standard error from the per-word spread and the repeats.'];
  return [head, ...about, '', ...body.map(([a, b, c]) => `${a.padEnd(w0)}  ${b.padStart(w1)}  ${c}`), '',
    ...notes.map(([a, b]) => `${a}: ${b}`)].join('\n') + '\n';
}
