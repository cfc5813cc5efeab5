/**
 * Which runs use a corpus — asked before a corpus is deleted. There is no runs module yet, so no check
 * is registered and every corpus is free to delete. The runs module will call
 * `registerCorpusUsageCheck` with a query of its own table; the delete route then applies the rule:
 * runs that are not archived block the delete (409); archived runs block it too unless the request
 * confirms them (`?confirmArchivedRuns=true`).
 */
import type { EntityManager } from '@mikro-orm/core';

export interface CorpusRunUse {
  runId: string;
  name: string;
  archived: boolean;
}

export type CorpusUsageCheck = (em: EntityManager, corpusId: string) => Promise<CorpusRunUse[]>;

const checks: CorpusUsageCheck[] = [];

/** Adds a check; returns a function that removes it again. */
export function registerCorpusUsageCheck(check: CorpusUsageCheck): () => void {
  checks.push(check);
  return () => {
    const i = checks.indexOf(check);
    if (i >= 0) checks.splice(i, 1);
  };
}

export async function runsUsingCorpus(em: EntityManager, corpusId: string): Promise<CorpusRunUse[]> {
  const uses: CorpusRunUse[] = [];
  for (const check of checks) uses.push(...(await check(em, corpusId)));
  return uses;
}

export type DeleteDecision = { allowed: true } | { allowed: false; message: string };

/** The delete rule, given the runs that use the corpus and whether the request confirmed archived runs. */
export function deleteDecision(uses: readonly CorpusRunUse[], confirmArchivedRuns: boolean): DeleteDecision {
  const active = uses.filter((u) => !u.archived);
  if (active.length > 0) {
    const names = active.slice(0, 3).map((u) => `"${u.name}"`).join(', ');
    return {
      allowed: false,
      message: `${active.length === 1 ? '1 run uses' : `${active.length} runs use`} this corpus (${names}${active.length > 3 ? ', …' : ''}); archive or delete ${active.length === 1 ? 'it' : 'them'} first.`,
    };
  }
  if (uses.length > 0 && !confirmArchivedRuns) {
    return {
      allowed: false,
      message: `${uses.length === 1 ? '1 archived run uses' : `${uses.length} archived runs use`} this corpus; confirm that you want to delete it anyway (their results stay, but they cannot be resumed).`,
    };
  }
  return { allowed: true };
}
