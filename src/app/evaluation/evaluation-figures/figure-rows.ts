/** The headline figures of a stored evaluation as table rows (label, value, error bar, unit), bits everywhere. */
import type { EvaluationResults } from '../../../../shared/api/evaluations';

export interface FigureRow { key: string; label: string; value: number; spread?: number; unit: string; digits: number; note?: string }

/** Bits per character always count the end-of-word symbol. */
const BPC = 'bits/char (end-of-word counted)';
/** Error bar: the standard error (per-word spread and repeats) when stored, else the older spread over repeats. */
const orNone = (x: number | null | undefined): number | undefined => (x === null || x === undefined ? undefined : x);

export function figureRows(r: EvaluationResults): FigureRow[] {
  const rows: FigureRow[] = [];
  if (r.family === 'ssm') {
    rows.push(
      { key: 'tight-word', label: `Tight estimate (K = ${r.tight.k}, ${r.tight.repeats} repeats)`, value: r.tight.bitsPerWord, spread: orNone(r.tight.standardError?.bitsPerWord.total) ?? r.tight.stdBitsPerWord, unit: 'bits/word', digits: 3 },
      { key: 'tight-char', label: 'Tight estimate per character', value: r.tight.bitsPerChar, spread: orNone(r.tight.standardError?.bitsPerChar.total) ?? r.tight.stdBitsPerChar, unit: BPC, digits: 4 },
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
      { key: 'exact-word', label: 'Held-out log-likelihood (exact)', value: r.heldOut.bitsPerWord, spread: orNone(r.heldOut.standardError?.bitsPerWord), unit: 'bits/word', digits: 3 },
      { key: 'exact-char', label: 'Held-out per character (exact)', value: r.heldOut.bitsPerChar, spread: orNone(r.heldOut.standardError?.bitsPerChar), unit: BPC, digits: 4 },
      { key: 'ce', label: 'Sequence cross entropy H(p_data, p_model)', value: r.crossEntropy.crossEntropyBits, unit: 'bits/word', digits: 3 },
      { key: 'hdata', label: 'Corpus entropy H(p_data)', value: r.crossEntropy.dataEntropyBits, unit: 'bits/word', digits: 3 },
      { key: 'kl', label: 'KL gap KL(p_data ‖ p_model)', value: r.crossEntropy.klGapBits, unit: 'bits/word', digits: 3 },
      { key: 'mass', label: 'Model mass on the corpus words', value: 100 * r.crossEntropy.modelMass, unit: '%', digits: 2 },
    );
    if (r.predictiveEntropy) rows.push({ key: 'obs', label: 'Predictive entropy, mean over steps', value: r.predictiveEntropy.meanBits, unit: 'bits/step', digits: 3 });
  }
  const b = r.baselines;
  rows.push({ key: 'unigram', label: 'Baseline: unigram characters (add-one)', value: b.unigram.bitsPerChar, unit: BPC, digits: 4 });
  if (b.ngram) rows.push({ key: 'ngram', label: `Baseline: Kneser–Ney ${b.ngram.order}-gram (exact)`, value: b.ngram.bitsPerChar, unit: BPC, digits: 4 });
  if (b.gru) rows.push({ key: 'gru', label: 'Baseline: GRU (exact)', value: b.gru.bitsPerChar, unit: BPC, digits: 4 });
  return rows;
}
