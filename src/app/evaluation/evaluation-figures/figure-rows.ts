/** The headline figures of a stored evaluation as table rows (label, value, error bar, unit), bits everywhere. */
import type { EvaluationResults } from '../../../../shared/api/evaluations';
import { BITS_PER_CHAR as BPC } from '../../../../shared/api/figure-names';

/** `spread`: the error bar; `spreadKind` says what it is (standard error, or the older spread over repeats). */
export interface FigureRow { key: string; label: string; value: number; spread?: number; spreadKind?: 'se' | 'sd-repeats'; unit: string; digits: number; note?: string }

/** Error bar: the standard error (per-word spread and repeats) when stored, else the older spread over repeats. */
const orNone = (x: number | null | undefined): number | undefined => (x === null || x === undefined ? undefined : x);
function errorBar(se: number | null | undefined, olderSd?: number): Pick<FigureRow, 'spread' | 'spreadKind'> {
  const s = orNone(se);
  if (s !== undefined) return { spread: s, spreadKind: 'se' };
  return olderSd === undefined ? {} : { spread: olderSd, spreadKind: 'sd-repeats' };
}

export function figureRows(r: EvaluationResults): FigureRow[] {
  const rows: FigureRow[] = [];
  if (r.family === 'ssm') {
    rows.push(
      { key: 'tight-word', label: `Tight estimate, a bound (K = ${r.tight.k}, ${r.tight.repeats} repeats)`, value: r.tight.bitsPerWord, ...errorBar(r.tight.standardError?.bitsPerWord.total, r.tight.stdBitsPerWord), unit: 'bits/word', digits: 3 },
      { key: 'tight-char', label: 'Tight estimate per character, a bound', value: r.tight.bitsPerChar, ...errorBar(r.tight.standardError?.bitsPerChar.total, r.tight.stdBitsPerChar), unit: BPC, digits: 4 },
      { key: 'ce', label: `Sequence cross entropy H(p_data, p_model) (S = ${r.crossEntropy.samples})`, value: r.crossEntropy.shared.crossEntropyBits, unit: 'bits/word', digits: 3 },
      { key: 'hdata', label: 'Corpus entropy H(p_data)', value: r.crossEntropy.shared.dataEntropyBits, unit: 'bits/word', digits: 3 },
      { key: 'kl', label: 'KL gap KL(p_data ‖ p_model)', value: r.crossEntropy.shared.klGapBits, unit: 'bits/word', digits: 3 },
      { key: 'mass', label: 'Model mass on the corpus words', value: 100 * r.crossEntropy.shared.modelMass, unit: '%', digits: 2 },
    );
    if (r.crossEntropy.iwae) {
      rows.push({ key: 'ce-iwae', label: `Cross entropy, second estimate (IWAE, K = ${r.crossEntropy.iwaeK})`, value: r.crossEntropy.iwae.crossEntropyBits, unit: 'bits/word', digits: 3 });
    }
    rows.push(
      { key: 'mi', label: 'Noise mutual information, mean over steps', value: r.noise.meanBits, unit: 'bits/step', digits: 3 },
      { key: 'obs', label: 'Observation entropy, mean over steps', value: r.observationEntropy.meanBits, unit: 'bits/step', digits: 3 },
    );
  } else {
    rows.push(
      { key: 'exact-word', label: 'Held-out cost (exact)', value: r.heldOut.bitsPerWord, ...errorBar(r.heldOut.standardError?.bitsPerWord), unit: 'bits/word', digits: 3 },
      { key: 'exact-char', label: 'Held-out cost per character (exact)', value: r.heldOut.bitsPerChar, ...errorBar(r.heldOut.standardError?.bitsPerChar), unit: BPC, digits: 4 },
      { key: 'ce', label: 'Sequence cross entropy H(p_data, p_model) (exact)', value: r.crossEntropy.crossEntropyBits, unit: 'bits/word', digits: 3 },
      { key: 'hdata', label: 'Corpus entropy H(p_data)', value: r.crossEntropy.dataEntropyBits, unit: 'bits/word', digits: 3 },
      { key: 'kl', label: 'KL gap KL(p_data ‖ p_model)', value: r.crossEntropy.klGapBits, unit: 'bits/word', digits: 3 },
      { key: 'mass', label: 'Model mass on the corpus words', value: 100 * r.crossEntropy.modelMass, unit: '%', digits: 2 },
    );
    if (r.predictiveEntropy) rows.push({ key: 'obs', label: 'Predictive entropy, mean over steps', value: r.predictiveEntropy.meanBits, unit: 'bits/step', digits: 3 });
  }
  const b = r.baselines;
  // Baselines (exact): bits per char and bits per word, with their standard errors when stored.
  const baseline = (key: string, label: string, f: { bitsPerChar: number; bitsPerWord: number; standardError?: { bitsPerChar: number | null; bitsPerWord: number | null } }) => rows.push(
    { key, label, value: f.bitsPerChar, ...errorBar(f.standardError?.bitsPerChar), unit: BPC, digits: 4 },
    { key: `${key}-word`, label: `${label} per word`, value: f.bitsPerWord, ...errorBar(f.standardError?.bitsPerWord), unit: 'bits/word', digits: 3 },
  );
  baseline('unigram', 'Baseline: unigram characters (add-one)', b.unigram);
  if (b.ngram) {
    baseline('ngram', `Baseline: Kneser–Ney ${b.ngram.order}-gram (exact)`, b.ngram);
    rows.push({ key: 'ngram-ce', label: `Baseline: Kneser–Ney ${b.ngram.order}-gram sequence cross entropy (exact)`, value: b.ngram.crossEntropy.crossEntropyBits, unit: 'bits/word', digits: 3 });
  }
  if (b.gru) {
    baseline('gru', 'Baseline: GRU (exact)', b.gru);
    rows.push({ key: 'gru-ce', label: 'Baseline: GRU sequence cross entropy (exact)', value: b.gru.crossEntropy.crossEntropyBits, unit: 'bits/word', digits: 3 });
  }
  return rows;
}
