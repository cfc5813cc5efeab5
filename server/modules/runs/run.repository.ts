import { raw, type EntityManager, type FilterQuery, type QueryOrderMap } from '@mikro-orm/core';
import { likeContains } from '../../db/like-pattern';
import type { RunDto, RunFamily, RunPage, RunSettings, RunStatus, listRunsQuerySchema } from '../../../shared/api/runs';
import type { RunPlacement } from '../../../shared/api/runners';
import { roleAtLeast, type Role } from '../../../shared/api/types';
import type { z } from 'zod';
import type { Bench } from '../benches/bench.entity';
import type { Corpus } from '../corpora/corpus.entity';
import type { User } from '../users/user.entity';
import { splitOf } from '../../../shared/data/split';
import { Run } from './run.entity';

type ListQuery = z.output<typeof listRunsQuerySchema>;

const SORT_COLUMNS: Record<ListQuery['sort'], keyof Run> = {
  createdAt: 'createdAt',
  updatedAt: 'updatedAt',
  name: 'name',
  status: 'status',
  stepsDone: 'stepsDone',
  bestBound: 'bestBoundBitsPerChar',
};

/** Members control the runs they created; coaches and owners (and admins, who act as owners) control all. */
export function canControlRun(run: Run, user: User, role: Role): boolean {
  return roleAtLeast(role, 'coach') || (roleAtLeast(role, 'member') && run.createdBy?.id === user.id);
}

export function toRunDto(run: Run, checkpointCount: number, canControl: boolean): RunDto {
  return {
    id: run.id,
    benchId: run.bench.id,
    corpus: run.corpus ? { id: run.corpus.id, name: run.corpus.name } : null,
    createdBy: run.createdBy ? { id: run.createdBy.id, displayName: run.createdBy.displayName } : null,
    name: run.name,
    family: run.family,
    settings: run.settings,
    alphabet: run.alphabet,
    status: run.status,
    statusReason: run.statusReason,
    summary: run.summary,
    stepsDone: run.stepsDone,
    archived: run.archived,
    checkpointCount,
    canControl,
    placement: run.placement,
    runner: run.runner ? { id: run.runner.id, name: run.runner.name ?? 'runner' } : null,
    live: run.placement === 'runners' ? run.live : null,
    createdAt: run.createdAt.toISOString(),
    updatedAt: run.updatedAt.toISOString(),
  };
}

export class RunRepository {
  constructor(private readonly em: EntityManager) {}

  /** The run if it belongs to the bench (corpus and creator loaded). */
  find(bench: Bench, id: string): Promise<Run | null> {
    return this.em.findOne(Run, { id, bench }, { populate: ['corpus', 'createdBy', 'runner'] });
  }

  create(data: {
    bench: Bench;
    corpus: Corpus | null;
    createdBy: User;
    name: string;
    family: RunFamily;
    settings: RunSettings;
    alphabet: string[];
    status: RunStatus;
    stepsDone?: number;
    placement?: RunPlacement;
    at: Date;
  }): Run {
    return this.em.create(Run, {
      bench: data.bench,
      corpus: data.corpus,
      createdBy: data.createdBy,
      name: data.name,
      family: data.family,
      settings: data.settings,
      alphabet: data.alphabet,
      status: data.status,
      stepsDone: data.stepsDone ?? 0,
      placement: data.placement ?? 'tab',
      createdAt: data.at,
      updatedAt: data.at,
    });
  }

  async page(bench: Bench, query: ListQuery, user: User, role: Role): Promise<RunPage> {
    const where: FilterQuery<Run> = { bench };
    if (query.corpusId) where.corpus = query.corpusId;
    if (query.family.length > 0) where.family = { $in: query.family };
    if (query.status.length > 0) where.status = { $in: query.status };
    if (query.archived !== 'all') where.archived = query.archived === 'true';
    // `%`, `_` and `\` in the search are plain characters (escaped), not wildcards.
    if (query.q) (where as Record<string, unknown>)[raw((alias: string) => `${alias}.name like ? escape '\\'`, [likeContains(query.q)])] = [];
    const orderBy = { [SORT_COLUMNS[query.sort]]: query.dir, id: 'asc' } as QueryOrderMap<Run>;
    const [runs, total] = await this.em.findAndCount(Run, where, {
      orderBy,
      limit: query.limit,
      offset: query.offset,
      populate: ['corpus', 'createdBy', 'runner'],
    });
    const counts = await this.checkpointCounts(runs.map((r) => r.id));
    return { items: runs.map((r) => toRunDto(r, counts.get(r.id) ?? 0, canControlRun(r, user, role))), total };
  }

  async checkpointCounts(runIds: string[]): Promise<Map<string, number>> {
    const counts = new Map<string, number>();
    if (runIds.length === 0) return counts;
    const rows: { run_id: string; n: number }[] = await this.em
      .getConnection()
      .execute(`select run_id, count(*) as n from checkpoints where run_id in (${runIds.map(() => '?').join(',')}) group by run_id`, runIds);
    for (const row of rows) counts.set(row.run_id, Number(row.n));
    return counts;
  }

  async dto(run: Run, user: User, role: Role): Promise<RunDto> {
    const counts = await this.checkpointCounts([run.id]);
    return toRunDto(run, counts.get(run.id) ?? 0, canControlRun(run, user, role));
  }

  /**
   * Whether a corpus has at least one training word under a split: the stored splits when the split is
   * the corpus's own, otherwise recomputed word by word with the same rule (shared/data/split.ts).
   */
  async hasTrainingWords(corpus: Corpus, split: NonNullable<RunSettings['split']>, ownSplit: boolean): Promise<boolean> {
    const conn = this.em.getConnection();
    if (ownSplit) {
      const rows: { n: number }[] = await conn.execute("select count(*) as n from corpus_words where corpus_id = ? and split = 'train'", [corpus.id]);
      return Number(rows[0]?.n ?? 0) > 0;
    }
    const words: { word: string }[] = await conn.execute('select word from corpus_words where corpus_id = ?', [corpus.id]);
    return words.some((w) => splitOf(w.word, split.seed, split.shares) === 'train');
  }

  /** Runs that use a corpus (for the corpus delete rule). */
  async usingCorpus(corpusId: string): Promise<{ runId: string; name: string; archived: boolean }[]> {
    // Plain SQL: the answer is only read, so no partly loaded runs end up in the request's identity map.
    const rows: { id: string; name: string; archived: number | boolean }[] = await this.em
      .getConnection()
      .execute('select id, name, archived from runs where corpus_id = ? order by created_at, id', [corpusId]);
    return rows.map((r) => ({ runId: r.id, name: r.name, archived: Boolean(r.archived) }));
  }
}
