import type { Problem } from '../corpora-api';

export interface ProblemGroup {
  /** 1-based line, or null for the file as a whole. */
  line: number | null;
  label: string;
  problems: Problem[];
  hasError: boolean;
}

/** Groups problems by line: the whole file first, then lines in order. */
export function groupProblems(problems: readonly Problem[]): ProblemGroup[] {
  const groups = new Map<number | null, Problem[]>();
  for (const p of problems) {
    const list = groups.get(p.line) ?? [];
    list.push(p);
    groups.set(p.line, list);
  }
  return [...groups]
    .sort(([a], [b]) => (a ?? 0) - (b ?? 0))
    .map(([line, list]) => ({
      line,
      label: line === null ? 'Whole file' : `Line ${line}`,
      problems: list,
      hasError: list.some((p) => p.severity === 'error'),
    }));
}
