/** The new-grid form model: name, corpus, family, budget, figure and up to three axes; the cell count check. */
import { FormArray, FormControl, FormGroup, Validators, type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import { MAX_GRID_AXES, MAX_GRID_CELLS, type CreateGridRequest, type GridFigure } from '../../../../shared/api/grids';
import type { RunFamily } from '../../../../shared/api/runs';
import { axisChoice, baseSettingsOf } from '../grid-axes';

const whole = (min: number, max: number) => [Validators.required, Validators.min(min), Validators.max(max), Validators.pattern(/^-?\d+$/)];

export function createAxisGroup(key = '', values: number[] = []) {
  return new FormGroup({
    key: new FormControl(key, { nonNullable: true, validators: [Validators.required] }),
    /** Indexes into the axis choice's values. */
    values: new FormControl<number[]>(values, { nonNullable: true, validators: [Validators.required] }),
  });
}
export type AxisGroup = ReturnType<typeof createAxisGroup>;

/** Cells of the grid as the form stands (axes without values count as one value, so the count never reads 0). */
export function cellCountOf(axes: { values: number[] }[]): number {
  return axes.reduce((n, a) => n * Math.max(1, a.values.length), 1);
}

const cellLimit: ValidatorFn = (c: AbstractControl): ValidationErrors | null => {
  const axes = (c as FormArray<AxisGroup>).getRawValue();
  const count = cellCountOf(axes);
  return count > MAX_GRID_CELLS ? { tooManyCells: count } : null;
};
const distinctKeys: ValidatorFn = (c: AbstractControl): ValidationErrors | null => {
  const keys = (c as FormArray<AxisGroup>).getRawValue().map((a) => a.key).filter(Boolean);
  return new Set(keys).size === keys.length ? null : { sameKey: true };
};

export function createGridForm() {
  return new FormGroup({
    name: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(120), Validators.pattern(/\S/)] }),
    corpusId: new FormControl('', { nonNullable: true, validators: [Validators.required] }),
    family: new FormControl<RunFamily>('ssm', { nonNullable: true }),
    figure: new FormControl<GridFigure>('bestValidationBitsPerChar', { nonNullable: true }),
    steps: new FormControl(300, { nonNullable: true, validators: whole(1, 1_000_000) }),
    batchSize: new FormControl(32, { nonNullable: true, validators: whole(1, 4096) }),
    learningRate: new FormControl(0.01, { nonNullable: true, validators: [Validators.required, Validators.min(1e-6), Validators.max(1)] }),
    evalEvery: new FormControl(50, { nonNullable: true, validators: whole(0, 1_000_000) }),
    checkpointEvery: new FormControl(100, { nonNullable: true, validators: whole(0, 1_000_000) }),
    axes: new FormArray<AxisGroup>([createAxisGroup('model.stateSize', [1, 2, 3])], {
      validators: [Validators.minLength(1), Validators.maxLength(MAX_GRID_AXES), cellLimit, distinctKeys],
    }),
  });
}
export type GridForm = ReturnType<typeof createGridForm>;

/** The `POST /grids` body of a valid form. */
export function createGridRequest(form: GridForm): CreateGridRequest {
  const v = form.getRawValue();
  return {
    name: v.name.trim(), corpusId: v.corpusId, family: v.family, figure: v.figure,
    baseSettings: baseSettingsOf(v.family, {
      steps: +v.steps, batchSize: +v.batchSize, learningRate: +v.learningRate, evalEvery: +v.evalEvery, checkpointEvery: +v.checkpointEvery,
    }),
    axes: v.axes.map((a) => {
      const choice = axisChoice(a.key)!;
      return { key: a.key, values: [...a.values].sort((x, y) => x - y).map((i) => choice.values[i]!.value) };
    }),
  };
}
