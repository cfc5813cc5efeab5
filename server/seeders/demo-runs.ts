/**
 * Demo seed step: three first runs on the "Archipelago places" demo corpus, sent to the runners, so a new demo
 * bench shows a baseline, a GRU and a stochastic state-space model side by side. The server's embedded runner
 * threads (RUNNER_THREADS, on by default) train them right after the first start, in the background; with no
 * runner they wait, and the run pages say so. Settings are the run form's defaults (shared/model/settings-rules.ts)
 * with short budgets, checked by the same schema as a run created through the API.
 */
import { createRunSchema, type CreateRunRequest, type RunSettings } from '../../shared/api/runs';
import { NEW_RUN_MODEL_DEFAULTS as D, NEW_RUN_TRAINING_DEFAULTS as T } from '../../shared/model/settings-rules';
import { Corpus } from '../modules/corpora/corpus.entity';
import { addNewRun } from '../modules/runs/run.service';
import type { SeedStep } from './demo-seed';

export const DEMO_RUN_CORPUS = 'Archipelago places';

const training = (steps: number) => ({
  steps, batchSize: T.batchSize, learningRate: T.learningRate, clipNorm: T.clipNorm, warmupSteps: T.warmupSteps,
  evalEvery: Math.ceil(steps / 6), checkpointEvery: Math.ceil(steps / 3), seed: 1,
});

/** The demo runs in the order the runners take them (the quick ones first). */
export const DEMO_RUNS: readonly Omit<CreateRunRequest, 'corpusId' | 'placement'>[] = [
  { family: 'ngram', name: 'Kneser–Ney 3', settings: { model: { order: D.ngramOrder, discount: null } } },
  {
    family: 'gru', name: 'GRU 8',
    settings: { model: { stateSize: D.stateSize, embeddingSize: D.embeddingSize, observationHidden: D.observationHidden }, training: training(1200) },
  },
  {
    family: 'ssm', name: 'State-space 8',
    settings: {
      model: {
        stateSize: D.stateSize, generativeFlow: D.generativeFlow.map((kind) => ({ kind })), inferenceFlow: D.inferenceFlow.map((kind) => ({ kind })),
        flowHidden: D.flowHidden, observationHidden: D.observationHidden, embeddingSize: D.embeddingSize, encoderSize: D.encoderSize, proposalHidden: D.proposalHidden,
      },
      training: { ...training(600), samples: D.samples, observationInitScale: T.observationInitScale },
    },
  },
];

export const createDemoRuns: SeedStep = {
  name: 'demo runs',
  async run(ctx) {
    const { bench, admin } = ctx.demo;
    if (!bench || !admin) throw new Error('The demo runs step needs the demo bench and its corpora before it.');
    const corpus = await ctx.em.findOne(Corpus, { bench, name: DEMO_RUN_CORPUS });
    if (!corpus) throw new Error(`The demo runs step needs the demo corpus "${DEMO_RUN_CORPUS}".`);
    const start = ctx.clock.now().getTime();
    DEMO_RUNS.forEach((spec, i) => {
      const body = createRunSchema.parse({ ...spec, corpusId: corpus.id, placement: 'runners' });
      // One millisecond apart, so the runners take them in this order (oldest waiting run first).
      addNewRun(ctx.em, { bench, me: admin, corpus, name: body.name, family: body.family, settings: body.settings as RunSettings, placement: 'runners', at: new Date(start + i) });
    });
    await ctx.em.flush();
  },
};
