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
  // The word orders of the words page and the export have descending keys, which only an expression states.
  indexes: [
    { properties: ['corpus', 'split'] },
    { name: 'corpus_words_corpus_id_count_word_index', expression: 'create index `corpus_words_corpus_id_count_word_index` on `corpus_words` (`corpus_id`, `count` desc, `word`)' },
    { name: 'corpus_words_corpus_id_length_word_index', expression: 'create index `corpus_words_corpus_id_length_word_index` on `corpus_words` (`corpus_id`, `length` desc, `word`)' },
  ],
  uniques: [{ properties: ['corpus', 'word'] }],
  properties: {
    id: { type: 'integer', primary: true, autoincrement: true },
    // No index of its own: corpus_id starts every other index of the table (each index is written for every word).
    corpus: { kind: 'm:1', entity: () => Corpus, deleteRule: 'cascade', index: false },
    word: { type: 'string', length: 1000 },
    count: { type: 'integer' },
    split: { type: 'string', length: 12 },
    length: { type: 'integer' },
  },
});
