import type { EntityManager } from '@mikro-orm/core';
import type { CorpusDetail, CorpusSummary, CorpusWordPage, CorpusWordRow, WordQuery } from '../../../shared/api/corpora';
import { roleAtLeast, type Role } from '../../../shared/api/types';
import { SPLIT_NAMES, type SplitCount, type SplitName } from '../../../shared/data/split';
import { ActivityRepository } from '../activity/activity.repository';
import type { Bench } from '../benches/bench.entity';
import type { User } from '../users/user.entity';
import type { AnalysedUpload } from './corpus-import';
import { wordRows } from './corpus-import';
import { CorpusWord } from './corpus-word.entity';
import { Corpus } from './corpus.entity';
import { caseInsensitiveGlob } from './word-search';
import { ClientGoneError } from '../../middleware/client-gone';

/**
 * Rows per INSERT statement (5 bound parameters each stays far below SQLite's parameter limit). Small
 * statements, one per event-loop turn: other requests are answered between them.
 */
const INSERT_CHUNK = 500;

const SORT_COLUMNS = { word: 'word', count: '`count`', length: '`length`' } as const;

/** What a save needs: the parse summary and the rows (from the CPU pool, or from `analyseUpload` directly). */
export interface SavableCorpus {
  fileName: string;
  options: AnalysedUpload['options'];
  parsed: Pick<AnalysedUpload['parsed'], 'ok' | 'format' | 'stats' | 'normalisation'> & { alphabet: { chars: string[] } };
  rows: { word: string; count: number; split: SplitName; length: number }[];
}

function savableOf(a: AnalysedUpload): SavableCorpus {
  return { fileName: a.fileName, options: a.options, parsed: a.parsed, rows: wordRows(a) };
}

/** Uploader, coaches and owners (an admin acts as owner) may rename and delete; viewers never. */
export function canEditCorpus(corpus: Corpus, user: User, role: Role): boolean {
  if (roleAtLeast(role, 'coach')) return true;
  return roleAtLeast(role, 'member') && corpus.uploadedBy?.id === user.id;
}

export class CorpusRepository {
  constructor(private readonly em: EntityManager) {}

  find(bench: Bench, id: string): Promise<Corpus | null> {
    return this.em.findOne(Corpus, { id, bench }, { populate: ['uploadedBy'] });
  }

  list(bench: Bench): Promise<Corpus[]> {
    return this.em.find(Corpus, { bench }, { orderBy: { createdAt: 'desc', name: 'asc' }, populate: ['uploadedBy'] });
  }

  /**
   * Saves a corpus (must have no errors) with all its words and an activity event in one transaction:
   * either everything is written or nothing. When `signal` aborts (the uploader's connection closed) before
   * the last words are written, the transaction is rolled back: nobody was told the corpus was saved, and
   * the work is not finished for nobody while other uploads wait.
   */
  async save(input: { bench: Bench; user: User | null; name: string; description: string; upload: AnalysedUpload | SavableCorpus; at: Date; signal?: AbortSignal }): Promise<Corpus> {
    const upload = 'splitParts' in input.upload ? savableOf(input.upload) : input.upload;
    const { parsed, options, fileName, rows } = upload;
    if (!parsed.ok || !parsed.format) throw new Error('A corpus with errors cannot be saved.');
    return this.em.transactional(async (em) => {
      const corpus = em.create(Corpus, {
        bench: input.bench,
        name: input.name,
        description: input.description,
        uploadedBy: input.user,
        fileName,
        format: parsed.format!,
        options,
        splitTrain: options.split.train,
        splitValidation: options.split.validation,
        splitTest: options.split.test,
        splitSeed: options.split.seed,
        alphabet: parsed.alphabet.chars,
        stats: parsed.stats,
        normalisation: parsed.normalisation,
        types: parsed.stats.types,
        tokens: parsed.stats.tokens,
        createdAt: input.at,
        updatedAt: input.at,
      });
      const who = input.user?.displayName ?? 'The demo set-up';
      new ActivityRepository(em).record(
        input.bench,
        input.user,
        'corpus.uploaded',
        `${who} uploaded the corpus "${input.name}" (${parsed.stats.types} words, ${parsed.stats.tokens} tokens).`,
        input.at,
      );
      await em.flush();
      const conn = em.getConnection();
      const tx = em.getTransactionContext();
      for (let i = 0; i < rows.length; i += INSERT_CHUNK) {
        if (input.signal?.aborted) throw new ClientGoneError();
        const chunk = rows.slice(i, i + INSERT_CHUNK);
        const params: unknown[] = [];
        for (const r of chunk) params.push(corpus.id, r.word, r.count, r.split, r.length);
        const values = chunk.map(() => '(?, ?, ?, ?, ?)').join(', ');
        await conn.execute(`insert into corpus_words (corpus_id, word, \`count\`, split, \`length\`) values ${values}`, params, 'run', tx);
        await new Promise((r) => setImmediate(r));
      }
      return corpus;
    });
  }

  async delete(corpus: Corpus): Promise<void> {
    await this.em.nativeDelete(Corpus, { id: corpus.id });
    this.em.getUnitOfWork().unsetIdentity(corpus);
  }

  async splitCounts(corpus: Corpus): Promise<Record<SplitName, SplitCount>> {
    const rows: { split: SplitName; types: number; tokens: number }[] = await this.em
      .getConnection('read')
      .execute('select split, count(*) as types, sum(`count`) as tokens from corpus_words where corpus_id = ? group by split', [corpus.id]);
    const out = Object.fromEntries(SPLIT_NAMES.map((s) => [s, { types: 0, tokens: 0 }])) as Record<SplitName, SplitCount>;
    for (const r of rows) out[r.split] = { types: Number(r.types), tokens: Number(r.tokens) };
    return out;
  }

  async words(corpus: Corpus, q: WordQuery): Promise<CorpusWordPage> {
    const where: string[] = ['corpus_id = ?'];
    const params: unknown[] = [corpus.id];
    if (q.split) {
      where.push('split = ?');
      params.push(q.split);
    }
    if (q.q) {
      where.push('word glob ?');
      params.push(caseInsensitiveGlob(q.q));
    }
    // The read connection: a page of words never waits for another upload's write transaction.
    const conn = this.em.getConnection('read');
    // Without filters the total is the corpus's number of word types (stored with it): no count over every row.
    const total: { n: number }[] =
      where.length === 1 ? [{ n: corpus.types }] : await conn.execute(`select count(*) as n from corpus_words where ${where.join(' and ')}`, params);
    const dir = q.dir === 'asc' ? 'asc' : 'desc';
    const order = q.sort === 'word' ? `word ${dir}` : `${SORT_COLUMNS[q.sort]} ${dir}, word asc`;
    const items: CorpusWordRow[] = await conn.execute(
      `select word, \`count\`, split, \`length\` from corpus_words where ${where.join(' and ')} order by ${order} limit ? offset ?`,
      [...params, q.limit, q.offset],
    );
    return { items: items.map((r) => ({ word: r.word, count: Number(r.count), split: r.split, length: Number(r.length) })), total: Number(total[0]?.n ?? 0) };
  }

  /**
   * Every word with its count and stored split, most frequent first (ties by word), as parallel arrays: the
   * training set of a tab or a runner. The read connection: it never waits for another upload's write transaction.
   */
  async trainingWords(corpus: Corpus): Promise<{ words: string[]; counts: number[]; splits: SplitName[] }> {
    const rows: { word: string; count: number; split: SplitName }[] = await this.em
      .getConnection('read')
      .execute('select word, `count`, split from corpus_words where corpus_id = ? order by `count` desc, word asc', [corpus.id]);
    return { words: rows.map((r) => r.word), counts: rows.map((r) => Number(r.count)), splits: rows.map((r) => r.split) };
  }

  /** All words, most frequent first (ties by word), for the export. */
  async allWords(corpus: Corpus): Promise<{ word: string; count: number }[]> {
    return this.em.getConnection('read').execute('select word, `count` from corpus_words where corpus_id = ? order by `count` desc, word asc', [corpus.id]);
  }
}

export function toCorpusSummary(corpus: Corpus, canEdit: boolean): CorpusSummary {
  return {
    id: corpus.id,
    name: corpus.name,
    description: corpus.description,
    fileName: corpus.fileName,
    types: corpus.types,
    tokens: corpus.tokens,
    alphabetSize: corpus.alphabet.length,
    unigramEntropyBits: corpus.stats.unigramEntropyBits,
    uploadedBy: corpus.uploadedBy ? { id: corpus.uploadedBy.id, displayName: corpus.uploadedBy.displayName } : null,
    createdAt: corpus.createdAt.toISOString(),
    canEdit,
  };
}

export function toCorpusDetail(corpus: Corpus, canEdit: boolean, splitCounts: Record<SplitName, SplitCount>): CorpusDetail {
  return {
    ...toCorpusSummary(corpus, canEdit),
    format: corpus.format,
    options: corpus.options,
    alphabet: corpus.alphabet,
    stats: corpus.stats,
    normalisation: corpus.normalisation,
    splitCounts,
  };
}
