/** A corpus analysed in the CPU pool (server/workers/cpu-tasks.ts) turned back into what a save needs. */
import type { AnalysedCorpus } from '../../workers/cpu-tasks';
import { SPLIT_CODES } from '../../workers/cpu-tasks';
import type { SavableCorpus } from './corpus.repository';

export function savableFromPool(fileName: string, a: AnalysedCorpus): SavableCorpus {
  const p = a.preview;
  const words = a.words === '' ? [] : a.words.split('\n');
  const rows = words.map((word, i) => ({ word, count: a.counts[i]!, split: SPLIT_CODES[a.splits[i]!]!, length: a.lengths[i]! }));
  return {
    fileName,
    options: p.options,
    parsed: { ok: p.ok, format: p.format, stats: p.stats, normalisation: p.normalisation, alphabet: { chars: p.alphabet } },
    rows,
  };
}
