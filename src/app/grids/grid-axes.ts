/**
 * The settings a grid can vary, with the values offered for each, and the base settings of a grid
 * (pure data, no Angular). Axis keys are paths into the run settings, as `shared/api/grids.ts` expects.
 */
import { gridAxisLabel, type GridAxisValue } from '../../../shared/api/grids';
import type { RunFamily } from '../../../shared/api/runs';
import { PRESETS } from '../runs/run-form';

export interface AxisValueChoice { label: string; value: GridAxisValue }
export interface AxisChoice { key: string; label: string; families: readonly RunFamily[]; values: readonly AxisValueChoice[] }

const stack = (...kinds: ('shift' | 'diag' | 'tril' | 'coupling')[]): AxisValueChoice => ({
  label: kinds.join(' → '), value: kinds.map((kind) => ({ kind })),
});
const nums = (...ns: number[]): AxisValueChoice[] => ns.map((n) => ({ label: String(n), value: n }));

export const AXIS_CHOICES: readonly AxisChoice[] = [
  { key: 'model.generativeFlow', label: gridAxisLabel('model.generativeFlow'), families: ['ssm'],
    values: [stack('shift'), stack('diag'), stack('tril'), stack('coupling', 'diag'), stack('coupling', 'coupling', 'diag')] },
  { key: 'model.inferenceFlow', label: gridAxisLabel('model.inferenceFlow'), families: ['ssm'],
    values: [stack('shift'), stack('diag'), stack('tril'), stack('coupling', 'diag')] },
  { key: 'model.stateSize', label: gridAxisLabel('model.stateSize'), families: ['ssm', 'gru'], values: nums(4, 8, 16, 32) },
  { key: 'training.samples', label: gridAxisLabel('training.samples'), families: ['ssm'], values: nums(1, 2, 4, 8, 16, 32) },
  { key: 'training.seed', label: gridAxisLabel('training.seed'), families: ['ssm', 'gru'], values: nums(1, 2, 3, 4, 5, 6, 7, 8) },
  { key: 'training.learningRate', label: gridAxisLabel('training.learningRate'), families: ['ssm', 'gru'], values: nums(0.003, 0.01, 0.03) },
  { key: 'model.order', label: gridAxisLabel('model.order'), families: ['ngram'], values: nums(1, 2, 3, 4, 5, 6) },
];

export function axisChoice(key: string): AxisChoice | undefined {
  return AXIS_CHOICES.find((a) => a.key === key);
}

export function axisChoicesFor(family: RunFamily): AxisChoice[] {
  return AXIS_CHOICES.filter((a) => a.families.includes(family));
}

export interface GridBudget { steps: number; batchSize: number; learningRate: number; evalEvery: number; checkpointEvery: number }

/** Base run settings of a grid's family from the "short trial" preset and the chosen budget. */
export function baseSettingsOf(family: RunFamily, budget: GridBudget): Record<string, unknown> {
  const p = PRESETS.short;
  const training = {
    steps: budget.steps, batchSize: budget.batchSize, samples: p.model.samples, learningRate: budget.learningRate,
    clipNorm: p.training.clipNorm, warmupSteps: 0, observationInitScale: p.training.observationInitScale, regime: 'token', seed: 1,
    evalEvery: budget.evalEvery, checkpointEvery: budget.checkpointEvery,
  };
  if (family === 'ngram') return { model: { order: 3, discount: null }, training };
  if (family === 'gru') return { model: { stateSize: p.model.stateSize, embeddingSize: p.model.embeddingSize, observationHidden: 0 }, training };
  return {
    model: {
      stateSize: p.model.stateSize, generativeFlow: p.model.generativeFlow.map((kind) => ({ kind })),
      inferenceFlow: p.model.inferenceFlow.map((kind) => ({ kind })), flowHidden: p.model.flowHidden,
      observationHidden: p.model.observationHidden, embeddingSize: p.model.embeddingSize, encoderSize: p.model.encoderSize,
      proposalHidden: p.model.proposalHidden,
    },
    training,
  };
}
