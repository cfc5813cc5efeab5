import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import type { CorpusFormat, CorpusOptions } from '../../../shared/api/corpora';
import type { CorpusStats } from '../../../shared/data/corpus-stats';
import type { NormaliseReport } from '../../../shared/data/normalise';
import { Bench } from '../benches/bench.entity';
import { User } from '../users/user.entity';

/**
 * An uploaded word list of a bench. Statistics are computed once at save time from the words as saved;
 * the words themselves are rows of `corpus_words`.
 */
export class Corpus {
  [OptionalProps]?: 'id' | 'description' | 'createdAt' | 'updatedAt';
  id: string = randomUUID();
  bench!: Bench;
  name!: string;
  description = '';
  uploadedBy!: User | null;
  fileName!: string;
  format!: CorpusFormat;
  /** The upload options as validated (format, merging, maximum length, normalisation, split). */
  options!: CorpusOptions;
  splitTrain!: number;
  splitValidation!: number;
  splitTest!: number;
  splitSeed!: number;
  /** Characters of the saved words, sorted by code point. */
  alphabet!: string[];
  stats!: CorpusStats;
  normalisation!: NormaliseReport | null;
  types!: number;
  tokens!: number;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const CorpusSchema = new EntitySchema<Corpus>({
  class: Corpus,
  tableName: 'corpora',
  indexes: [{ properties: ['bench', 'createdAt'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    bench: { kind: 'm:1', entity: () => Bench, deleteRule: 'cascade' },
    name: { type: 'string', length: 80 },
    description: { type: 'text', default: '' },
    uploadedBy: { kind: 'm:1', entity: () => User, nullable: true, deleteRule: 'set null' },
    fileName: { type: 'string', length: 255 },
    format: { type: 'string', length: 8 },
    options: { type: 'json' },
    splitTrain: { type: 'double' },
    splitValidation: { type: 'double' },
    splitTest: { type: 'double' },
    splitSeed: { type: 'integer' },
    alphabet: { type: 'json' },
    stats: { type: 'json' },
    normalisation: { type: 'json', nullable: true },
    types: { type: 'integer' },
    tokens: { type: 'integer' },
    createdAt: { type: 'datetime' },
    updatedAt: { type: 'datetime', onUpdate: () => new Date() },
  },
});
