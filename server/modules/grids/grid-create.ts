/**
 * Creating a grid and its runs in one transaction (plain grids and learnability checks). The corpus must
 * belong to the bench and have training words under the split; every run starts `queued`.
 */
import type { AppContext } from '../../app-context';
import type { GridAxis, GridFigure, GridKind } from '../../../shared/api/grids';
import type { RunPlacement } from '../../../shared/api/runners';
import type { RunFamily, RunSettings } from '../../../shared/api/runs';
import { validationFailed } from '../../http-error';
import { ActivityRepository } from '../activity/activity.repository';
import type { Bench } from '../benches/bench.entity';
import type { Corpus } from '../corpora/corpus.entity';
import { publishRun, queueForRunners } from '../runners/run-queueing';
import type { Run } from '../runs/run.entity';
import { RunRepository } from '../runs/run.repository';
import { corpusSplit } from '../runs/run-settings';
import type { User } from '../users/user.entity';
import { Grid } from './grid.entity';

export interface GridRunPlan {
  coords: number[];
  label: string;
  family: RunFamily;
  settings: RunSettings;
}

/** Refuses (422) a corpus whose alphabet is too large or whose split leaves no training word. */
export async function checkCorpusForRuns(ctx: AppContext, corpus: Corpus, split: NonNullable<RunSettings['split']>, field: string): Promise<void> {
  if (corpus.alphabet.length + 1 > 4096) {
    throw validationFailed({ [field]: `This corpus has ${corpus.alphabet.length} different characters; models take at most 4095. Restrict its alphabet first.` });
  }
  const own = JSON.stringify(split) === JSON.stringify(corpusSplit(corpus));
  if (!(await new RunRepository(ctx.orm.em).hasTrainingWords(corpus, split, own))) {
    throw validationFailed({ [field]: 'No word of this corpus falls in the training split; raise the train share or choose another split seed.' });
  }
}

export async function createGridWithRuns(ctx: AppContext, data: {
  bench: Bench; corpus: Corpus; me: User; name: string; kind: GridKind; family: RunFamily | null; axes: GridAxis[];
  baseSettings: Record<string, unknown>; figure: GridFigure; budgetSteps: number | null; runs: GridRunPlan[]; placement: RunPlacement;
}): Promise<Grid> {
  const now = ctx.clock.now();
  const created: Run[] = [];
  const grid = await ctx.orm.em.transactional(async (em) => {
    const grid = em.create(Grid, {
      bench: data.bench, corpus: data.corpus, name: data.name, kind: data.kind, family: data.family, axes: data.axes,
      baseSettings: data.baseSettings, figure: data.figure, budgetSteps: data.budgetSteps, createdBy: data.me, createdAt: now,
    });
    const runs = new RunRepository(em);
    for (const plan of data.runs) {
      const name = `${data.name} · ${plan.label}`;
      const run = runs.create({
        bench: data.bench, corpus: data.corpus, createdBy: data.me, name: name.length > 120 ? `${name.slice(0, 119)}…` : name,
        family: plan.family, settings: plan.settings, alphabet: data.corpus.alphabet.slice(), status: 'queued', placement: data.placement, at: now,
      });
      created.push(run);
      run.grid = grid;
      run.gridCell = plan.coords;
    }
    const what = data.kind === 'learnability' ? 'learnability check' : 'grid';
    new ActivityRepository(em).record(data.bench, data.me, `${data.kind === 'learnability' ? 'learnability' : 'grid'}.created`,
      `${data.me.displayName} started the ${what} "${data.name}" (${data.runs.length} runs) on the corpus "${data.corpus.name}"${data.placement === 'runners' ? ' and sent it to the runners' : ''}.`, now);
    return grid;
  });
  // Runner runs go on the queue once their rows exist; every new run is announced to the bench's streams.
  await queueForRunners(ctx, ctx.orm.em, created);
  for (const run of created) await publishRun(ctx, ctx.orm.em, run);
  return grid;
}
