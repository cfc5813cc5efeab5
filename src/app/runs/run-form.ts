/**
 * The new-run form model: reactive controls with the same limits as the server's zod schemas
 * (shared/api/runs.ts), the two presets, and the conversion to a `POST /runs` body.
 */
import { FormControl, FormGroup, Validators, type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import type { CreateRunRequest, RunFamily } from '../../../shared/api/runs';
import type { FlowKind } from '../../../shared/model/flows/flow';
import { NEW_RUN_MODEL_DEFAULTS as D, NEW_RUN_TRAINING_DEFAULTS as T, OBSERVATION_INIT_SCALE_RANGE, SETTING_LIMITS, type LimitedSetting } from '../../../shared/model/settings-rules';
import type { TrainerSettings } from '../workers/trainer-api';

const whole = (min: number, max: number) => [Validators.required, Validators.min(min), Validators.max(max), Validators.pattern(/^-?\d+$/)];
/** Limits of model settings from shared/model/settings-rules.ts (the same ones the server checks). */
const limit = (key: LimitedSetting) => whole(SETTING_LIMITS[key][0], SETTING_LIMITS[key][1]);
const nonEmptyStack: ValidatorFn = (c: AbstractControl): ValidationErrors | null =>
  Array.isArray(c.value) && c.value.length > 0 ? (c.value.length > 8 ? { tooManyLayers: true } : null) : { noLayers: true };

const sharesAddUp: ValidatorFn = (g: AbstractControl): ValidationErrors | null => {
  const v = (g as FormGroup).getRawValue() as { ownSplit: boolean; train: number; validation: number; test: number };
  if (!v.ownSplit) return null;
  const sum = Number(v.train) + Number(v.validation) + Number(v.test);
  return Math.abs(sum - 1) <= 1e-9 ? null : { sharesSum: true };
};

export function createRunForm() {
  return new FormGroup({
    data: new FormGroup({
      name: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(120), Validators.pattern(/\S/)] }),
      corpusId: new FormControl('', { nonNullable: true, validators: [Validators.required] }),
      ownSplit: new FormControl(false, { nonNullable: true }),
      splitSeed: new FormControl(1, { nonNullable: true, validators: whole(0, 2 ** 31 - 1) }),
      train: new FormControl(0.8, { nonNullable: true, validators: [Validators.required, Validators.min(0.01), Validators.max(1)] }),
      validation: new FormControl(0.1, { nonNullable: true, validators: [Validators.required, Validators.min(0), Validators.max(1)] }),
      test: new FormControl(0.1, { nonNullable: true, validators: [Validators.required, Validators.min(0), Validators.max(1)] }),
    }, { validators: sharesAddUp }),
    model: new FormGroup({
      family: new FormControl<RunFamily>('ssm', { nonNullable: true }),
      stateSize: new FormControl<number>(D.stateSize, { nonNullable: true, validators: limit('stateSize') }),
      generativeFlow: new FormControl<FlowKind[]>([...D.generativeFlow], { nonNullable: true, validators: nonEmptyStack }),
      inferenceFlow: new FormControl<FlowKind[]>([...D.inferenceFlow], { nonNullable: true, validators: nonEmptyStack }),
      flowHidden: new FormControl<number>(D.flowHidden, { nonNullable: true, validators: limit('flowHidden') }),
      encoderSize: new FormControl<number>(D.encoderSize, { nonNullable: true, validators: limit('encoderSize') }),
      embeddingSize: new FormControl<number>(D.embeddingSize, { nonNullable: true, validators: limit('embeddingSize') }),
      proposalHidden: new FormControl<number>(D.proposalHidden, { nonNullable: true, validators: limit('proposalHidden') }),
      observationHidden: new FormControl<number>(D.observationHidden, { nonNullable: true, validators: limit('observationHidden') }),
      samples: new FormControl<number>(D.samples, { nonNullable: true, validators: limit('samples') }),
      order: new FormControl<number>(D.ngramOrder, { nonNullable: true, validators: limit('ngramOrder') }),
    }),
    training: new FormGroup({
      batchSize: new FormControl<number>(T.batchSize, { nonNullable: true, validators: whole(1, 4096) }),
      steps: new FormControl<number>(T.steps, { nonNullable: true, validators: whole(1, 1_000_000) }),
      learningRate: new FormControl<number>(T.learningRate, { nonNullable: true, validators: [Validators.required, Validators.min(1e-6), Validators.max(1)] }),
      clipNorm: new FormControl<number>(T.clipNorm, { nonNullable: true, validators: [Validators.required, Validators.min(0), Validators.max(1e6)] }),
      warmupSteps: new FormControl<number>(T.warmupSteps, { nonNullable: true, validators: whole(0, 1_000_000) }),
      observationInitScale: new FormControl<number>(T.observationInitScale, { nonNullable: true,
        validators: [Validators.required, Validators.min(OBSERVATION_INIT_SCALE_RANGE[0]), Validators.max(OBSERVATION_INIT_SCALE_RANGE[1])] }),
      regime: new FormControl<'token' | 'type'>('token', { nonNullable: true }),
      seed: new FormControl(1, { nonNullable: true, validators: whole(0, 2 ** 31 - 1) }),
      evalEvery: new FormControl(100, { nonNullable: true, validators: whole(0, 1_000_000) }),
      checkpointEvery: new FormControl(250, { nonNullable: true, validators: whole(0, 1_000_000) }),
    }),
  });
}

export type RunForm = ReturnType<typeof createRunForm>;
export type RunFormValue = ReturnType<RunForm['getRawValue']>;

export const PRESETS = {
  /** Small and fast: a first look at whether the corpus is learnable at all (common practice, no source). */
  short: {
    model: { stateSize: 8, generativeFlow: ['coupling', 'diag'] as FlowKind[], inferenceFlow: ['diag'] as FlowKind[], flowHidden: 16,
      encoderSize: 32, embeddingSize: 8, proposalHidden: 16, observationHidden: 0, samples: 4 },
    training: { batchSize: 32, steps: 300, learningRate: 0.01, clipNorm: 5, warmupSteps: 0, observationInitScale: T.observationInitScale, evalEvery: 50, checkpointEvery: 100 },
  },
  /** Larger K, wider networks and a warm-up: tighter bounds for a result worth reporting (common practice, no source). */
  thorough: {
    model: { stateSize: 16, generativeFlow: ['coupling', 'coupling', 'diag'] as FlowKind[], inferenceFlow: ['tril'] as FlowKind[],
      flowHidden: 64, encoderSize: 64, embeddingSize: 16, proposalHidden: 64, observationHidden: 0, samples: 16 },
    training: { batchSize: 64, steps: 5000, learningRate: 0.003, clipNorm: 5, warmupSteps: 500, observationInitScale: T.observationInitScale, evalEvery: 250, checkpointEvery: 500 },
  },
} as const;

export function applyPreset(form: RunForm, name: keyof typeof PRESETS): void {
  const p = PRESETS[name];
  form.controls.model.patchValue({ ...p.model, generativeFlow: [...p.model.generativeFlow], inferenceFlow: [...p.model.inferenceFlow] });
  form.controls.training.patchValue(p.training);
}

/** The worker's view of the form (for the parameter count and the time estimate). */
export function trainerSettingsFromForm(v: RunFormValue): TrainerSettings {
  const m = v.model;
  const t = v.training;
  return {
    family: m.family, stateSize: +m.stateSize, generativeFlow: m.generativeFlow, inferenceFlow: m.inferenceFlow,
    flowHidden: +m.flowHidden, encoderSize: +m.encoderSize, embeddingSize: +m.embeddingSize, proposalHidden: +m.proposalHidden,
    observationHidden: +m.observationHidden, samples: +m.samples, batchSize: +t.batchSize, steps: +t.steps,
    learningRate: +t.learningRate, clipNorm: +t.clipNorm, warmupSteps: +t.warmupSteps, observationInitScale: +t.observationInitScale,
    regime: t.regime, seed: +t.seed,
    order: +m.order, evalEvery: +t.evalEvery,
  };
}

export function createRunRequest(v: RunFormValue): CreateRunRequest {
  const d = v.data;
  const m = v.model;
  const split = d.ownSplit ? { split: { seed: +d.splitSeed, shares: { train: +d.train, validation: +d.validation, test: +d.test } } } : {};
  const training = {
    steps: +v.training.steps, batchSize: +v.training.batchSize, samples: +m.samples, learningRate: +v.training.learningRate,
    clipNorm: +v.training.clipNorm, warmupSteps: +v.training.warmupSteps, observationInitScale: +v.training.observationInitScale,
    regime: v.training.regime, seed: +v.training.seed,
    evalEvery: +v.training.evalEvery, checkpointEvery: +v.training.checkpointEvery,
  };
  const base = { name: d.name.trim(), corpusId: d.corpusId };
  if (m.family === 'ngram') {
    return { ...base, family: 'ngram', settings: { model: { order: +m.order, discount: null }, training, ...split } };
  }
  if (m.family === 'gru') {
    return { ...base, family: 'gru', settings: { model: { stateSize: +m.stateSize, embeddingSize: +m.embeddingSize, observationHidden: +m.observationHidden }, training, ...split } };
  }
  return {
    ...base, family: 'ssm',
    settings: {
      model: {
        stateSize: +m.stateSize, generativeFlow: m.generativeFlow.map((kind) => ({ kind })), inferenceFlow: m.inferenceFlow.map((kind) => ({ kind })),
        flowHidden: +m.flowHidden, observationHidden: +m.observationHidden, embeddingSize: +m.embeddingSize,
        encoderSize: +m.encoderSize, proposalHidden: +m.proposalHidden,
      },
      training, ...split,
    },
  };
}
