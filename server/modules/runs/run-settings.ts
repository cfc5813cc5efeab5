/** Small helpers about run settings shared by the run routes and the checkpoint checks. */
import type { RunFamily, RunSettings } from '../../../shared/api/runs';
import type { Corpus } from '../corpora/corpus.entity';

/** How a model family is named in messages and the activity log. */
export const FAMILY_LABELS: Readonly<Record<RunFamily, string>> = {
  ssm: 'state-space model',
  gru: 'GRU baseline',
  ngram: 'n-gram baseline',
};

/** The split a corpus was saved with, in the run-settings form. */
export function corpusSplit(corpus: Corpus): NonNullable<RunSettings['split']> {
  return { seed: corpus.splitSeed, shares: { train: corpus.splitTrain, validation: corpus.splitValidation, test: corpus.splitTest } };
}
