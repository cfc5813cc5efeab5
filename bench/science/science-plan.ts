/**
 * What `npm run bench:science` trains and how much: the rows of the reproduction table and the two budgets.
 * Every model uses the CLI defaults (shared/cli/train-options.ts) except the setting its row names; nothing here
 * is tuned to make a claim pass.
 */
import type { EvaluationSettings } from '../../shared/eval/evaluation-report';

export type CorpusKey = 'names' | 'subtlex';

export interface RunSpec {
  /** Row label, e.g. "SSM-8" or "SSM-8, generative flow shift (b)". */
  label: string;
  /** Group for the claims: the same `group` with different seeds are repeats. */
  group: string;
  corpus: CorpusKey;
  model: 'ssm' | 'gru' | 'ngram';
  seed: number;
  /** Options for `npm run train` (flag names without the dashes). */
  args: Record<string, string>;
}

export interface Budget {
  name: 'full' | 'quick';
  ssmSteps: number;
  gruSteps: number;
  /** Parallel jobs (one process each). */
  jobs: number;
  evaluation: Omit<EvaluationSettings, 'prefixes' | 'particles' | 'tMax' | 'seed'>;
  statement: string;
}

export const BUDGETS: Record<'full' | 'quick', Budget> = {
  full: {
    name: 'full', ssmSteps: 1500, gruSteps: 5000, jobs: 2,
    evaluation: { tightK: 256, repeats: 2, trajectories: 1024, crossEntropyK: 16, noiseDraws: 64, detailWords: 100, samples: 1000, maxHeldOut: 1_000_000 },
    statement: 'SSM runs 1,500 steps, GRU runs 5,000 steps (batch 64, CLI defaults otherwise); every held-out (test) word scored with ' +
      'K 256 × 2 repeats; sequence cross entropy with S 1,024 prior trajectories and a K 16 IWAE estimate; 2 processes in parallel; ' +
      '24.6 min on 2 quiet cores when last run (2026-12-05).',
  },
  quick: {
    name: 'quick', ssmSteps: 150, gruSteps: 600, jobs: 2,
    evaluation: { tightK: 16, repeats: 2, trajectories: 256, crossEntropyK: 0, noiseDraws: 64, detailWords: 50, samples: 200, maxHeldOut: 1_000_000 },
    statement: 'QUICK budget — SSM runs 150 steps, GRU runs 600 steps (batch 64, CLI defaults otherwise); every held-out (test) word ' +
      'scored with K 16 × 2 repeats; sequence cross entropy from S 256 prior trajectories only (no IWAE estimate); SSM-32 and the ' +
      'second SUBTLEX seeds left out; 2 processes in parallel. Far too short for the claims: a smoke run of the harness.',
  },
};

const SSM_DEFAULT = { 'state-size': '8' };

/** The rows for one corpus under a budget. */
export function plan(budget: Budget, corpus: CorpusKey): RunSpec[] {
  const quick = budget.name === 'quick';
  const ssm = (label: string, group: string, seed: number, args: Record<string, string>): RunSpec =>
    ({ label, group, corpus, model: 'ssm', seed, args: { ...SSM_DEFAULT, ...args, steps: String(budget.ssmSteps) } });
  const runs: RunSpec[] = [];
  for (let order = 1; order <= 5; order++) {
    runs.push({ label: `KN-${order}`, group: `KN-${order}`, corpus, model: 'ngram', seed: 1, args: { order: String(order) } });
  }
  const seeds = quick && corpus === 'subtlex' ? [1] : [1, 2];
  for (const seed of seeds) {
    runs.push({ label: `GRU-8 (seed ${seed})`, group: 'GRU-8', corpus, model: 'gru', seed, args: { 'state-size': '8', steps: String(budget.gruSteps) } });
  }
  for (const seed of seeds) runs.push(ssm(`SSM-8 (seed ${seed})`, 'SSM-8', seed, {}));
  runs.push(ssm('SSM-16', 'SSM-16', 1, { 'state-size': '16' }));
  if (!quick) runs.push(ssm('SSM-32', 'SSM-32', 1, { 'state-size': '32' }));
  if (corpus === 'names' || !quick) {
    runs.push(ssm('SSM-8, generative flow shift only (b)', 'SSM-8 gen shift', 1, { 'gen-flow': 'shift' }));
    runs.push(ssm('SSM-8, trained with K 1 (c)', 'SSM-8 K1', 1, { samples: '1' }));
    runs.push(ssm('SSM-8, inference flow coupling, coupling, diag (d)', 'SSM-8 inf coupling', 1, { 'inf-flow': 'coupling,coupling,diag' }));
  }
  return runs;
}
