import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import type { SplitName } from '../../../shared/data/split';
import { Corpus } from './corpus.entity';

/** One word type of a corpus with its count, its length in characters and its split. */
export class CorpusWord {
  [OptionalProps]?: 'id';
  id!: number;
  corpus!: Corpus;
  word!: string;
  count!: number;
  split!: SplitName;
  length!: number;
}

export const CorpusWordSchema = new EntitySchema<CorpusWord>({
  class: CorpusWord,
  tableName: 'corpus_words',
  // Also (corpus_id, count desc, word) and (corpus_id, length desc, word), made by migrations (descending keys).
  indexes: [{ properties: ['corpus', 'split'] }],
  uniques: [{ properties: ['corpus', 'word'] }],
  properties: {
    id: { type: 'integer', primary: true, autoincrement: true },
    corpus: { kind: 'm:1', entity: () => Corpus, deleteRule: 'cascade' },
    word: { type: 'string', length: 1000 },
    count: { type: 'integer' },
    split: { type: 'string', length: 12 },
    length: { type: 'integer' },
  },
});
