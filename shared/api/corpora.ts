/**
 * Corpora part of the REST API: upload options (zod, shared so the client validates like the server)
 * and the DTOs of `/api/benches/:benchId/corpora`. See DEVELOPERS.md, "REST API".
 */
import { z } from 'zod';
import { safeText } from './safe-text';
import type { CorpusFormat, Problem, ProblemCode } from '../data/corpus-parse';
import type { CorpusStats } from '../data/corpus-stats';
import type { NormaliseReport } from '../data/normalise';
import type { SplitCount, SplitName } from '../data/split';

export type { CorpusFormat, Problem, ProblemCode, CorpusStats, NormaliseReport, SplitCount, SplitName };

export const MAX_WORD_LENGTH_LIMIT = 200;
export const CORPUS_NAME_MAX = 80;
export const CORPUS_DESCRIPTION_MAX = 500;
/** Rows of the preview's word sample. */
export const PREVIEW_WORDS = 200;

const share = (name: string) =>
  z
    .number({ error: `Give the ${name} share as a number from 0 to 1.` })
    .min(0, `Give a ${name} share of at least 0.`)
    .max(1, `Give a ${name} share of at most 1.`);

export const splitSettingsSchema = z
  .object({
    train: share('train').default(0.8),
    validation: share('validation').default(0.1),
    test: share('test').default(0.1),
    seed: z
      .number({ error: 'Give the split seed as a whole number.' })
      .int('Give the split seed as a whole number.')
      .min(0, 'Give a split seed of 0 or more.')
      .max(2_147_483_647, 'Give a split seed below 2,147,483,648.')
      .default(1),
  })
  .refine((s) => Math.abs(s.train + s.validation + s.test - 1) < 1e-6, {
    message: 'The train, validation and test shares must add up to 100 %.',
    path: ['train'],
  })
  .refine((s) => s.train > 0, { message: 'Give the train split a share above 0.', path: ['train'] });

export const normaliseSettingsSchema = z.object({
  lowerCase: z.boolean({ error: 'Send lowerCase as true or false.' }).default(true),
  nfc: z.boolean({ error: 'Send nfc as true or false.' }).default(true),
  stripDiacritics: z.boolean({ error: 'Send stripDiacritics as true or false.' }).default(false),
  /** Allowed characters after normalisation; empty = every character is allowed. */
  allowedChars: safeText('Send the allowed characters as text.').max(1000, 'List at most 1,000 allowed characters.').default(''),
  outsideAlphabet: z
    .enum(['drop-word', 'drop-char', 'keep'], { error: 'Choose what happens to other characters: drop-word, drop-char or keep.' })
    .default('drop-word'),
});

/** The `options` field of an upload (multipart, JSON text). */
export const corpusOptionsSchema = z.object({
  /** Taken from the file name's extension when absent. */
  format: z.enum(['txt', 'tsv', 'csv'], { error: 'Choose the format: txt, tsv or csv.' }).optional(),
  mergeDuplicates: z.boolean({ error: 'Send mergeDuplicates as true or false.' }).default(false),
  maxWordLength: z
    .number({ error: 'Give the maximum word length as a whole number.' })
    .int('Give the maximum word length as a whole number.')
    .min(1, 'Give a maximum word length of at least 1.')
    .max(MAX_WORD_LENGTH_LIMIT, `Give a maximum word length of at most ${MAX_WORD_LENGTH_LIMIT}.`)
    .default(40),
  normalise: normaliseSettingsSchema.prefault({}),
  split: splitSettingsSchema.prefault({}),
});
export type CorpusOptionsInput = z.input<typeof corpusOptionsSchema>;
export type CorpusOptions = z.output<typeof corpusOptionsSchema>;

export const corpusNameField = safeText('Give the corpus a name.')
  .trim()
  .min(1, 'Give the corpus a name.')
  .max(CORPUS_NAME_MAX, `Use a corpus name of at most ${CORPUS_NAME_MAX} characters.`);

export const corpusDescriptionField = safeText('Send the description as text.', { lineBreaks: true })
  .trim()
  .max(CORPUS_DESCRIPTION_MAX, `Use a description of at most ${CORPUS_DESCRIPTION_MAX} characters.`);

/** The text fields of a save (besides `file` and `options`). */
export const saveCorpusFieldsSchema = z.object({
  name: corpusNameField,
  description: corpusDescriptionField.default(''),
});

export const updateCorpusSchema = z
  .object({ name: corpusNameField.optional(), description: corpusDescriptionField.optional() })
  .refine((b) => b.name !== undefined || b.description !== undefined, {
    message: 'Send a new name or a new description.',
    path: ['name'],
  });
export type UpdateCorpusRequest = z.input<typeof updateCorpusSchema>;

export const WORD_SORTS = ['word', 'count', 'length'] as const;
export type WordSort = (typeof WORD_SORTS)[number];

export const wordQuerySchema = z.object({
  sort: z.enum(WORD_SORTS, { error: 'Sort by word, count or length.' }).default('count'),
  dir: z.enum(['asc', 'desc'], { error: 'Give dir as asc or desc.' }).default('desc'),
  q: safeText('Send the search as text.').max(100, 'Search for at most 100 characters.').default(''),
  split: z.enum(['', 'train', 'validation', 'test'], { error: 'Filter by split: train, validation or test.' }).default(''),
  offset: z.coerce.number({ error: 'Give offset as a whole number.' }).int('Give offset as a whole number.').min(0, 'Give an offset of 0 or more.').default(0),
  limit: z.coerce.number({ error: 'Give limit as a whole number.' }).int('Give limit as a whole number.').min(1, 'Give a limit of at least 1.').max(500, 'Give a limit of at most 500.').default(50),
});
export type WordQuery = z.output<typeof wordQuerySchema>;

export interface WordRow {
  word: string;
  count: number;
  /** Characters (code points). */
  length: number;
}

export interface CorpusPreview {
  ok: boolean;
  fileName: string;
  format: CorpusFormat | null;
  header: string[] | null;
  lineCount: number;
  errorCount: number;
  problems: Problem[];
  problemCounts: Partial<Record<ProblemCode, number>>;
  /** Characters of the normalised words, sorted by code point. */
  alphabet: string[];
  normalisation: NormaliseReport | null;
  stats: CorpusStats;
  splitCounts: Record<SplitName, SplitCount>;
  /** The first PREVIEW_WORDS words in file order (after normalisation). */
  sample: WordRow[];
  options: CorpusOptions;
}

/** Body of a 422 CORPUS_INVALID answer to a save. */
export interface CorpusInvalidBody {
  error: { code: 'CORPUS_INVALID'; message: string; problems: Problem[]; errorCount: number };
}

export interface CorpusSummary {
  id: string;
  name: string;
  description: string;
  fileName: string;
  types: number;
  tokens: number;
  alphabetSize: number;
  unigramEntropyBits: number;
  uploadedBy: { id: string; displayName: string } | null;
  createdAt: string;
  /** Whether the caller may rename or delete it (uploader, coach, owner). */
  canEdit: boolean;
}

export interface CorpusDetail extends CorpusSummary {
  format: CorpusFormat;
  options: CorpusOptions;
  alphabet: string[];
  stats: CorpusStats;
  normalisation: NormaliseReport | null;
  splitCounts: Record<SplitName, SplitCount>;
}

export interface CorpusWordRow extends WordRow {
  split: SplitName;
}

export interface CorpusWordPage {
  items: CorpusWordRow[];
  total: number;
}
