import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { EvaluationSettingsInput } from '../../../../shared/api/evaluations';

export interface BaselineChoice { runId: string; label: string }

const whole = (min: number, max: number) => [Validators.required, Validators.min(min), Validators.max(max), Validators.pattern(/^\d+$/)];

/** What the person chooses before "Evaluate": the budgets of every figure, the seed and an optional GRU baseline. */
@Component({
  selector: 'nw-evaluation-settings',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule],
  template: `
    <form [formGroup]="form" (ngSubmit)="submit()" class="grid" aria-label="Evaluation settings">
      <mat-form-field>
        <mat-label>K (tight estimate)</mat-label>
        <input matInput type="number" formControlName="K" min="64" max="1024" />
        <mat-hint>importance samples per word, 64–1024</mat-hint>
        <mat-error>Give K as a whole number from 64 to 1024.</mat-error>
      </mat-form-field>
      <mat-form-field>
        <mat-label>Repeats</mat-label>
        <input matInput type="number" formControlName="repeats" min="1" max="10" />
        <mat-hint>for the spread, 1–10</mat-hint>
        <mat-error>Give 1 to 10 repeats.</mat-error>
      </mat-form-field>
      <mat-form-field>
        <mat-label>S (prior trajectories)</mat-label>
        <input matInput type="number" formControlName="S" min="16" max="16384" />
        <mat-hint>for the cross entropy, 16–16384</mat-hint>
        <mat-error>Give S as a whole number from 16 to 16384.</mat-error>
      </mat-form-field>
      <mat-form-field>
        <mat-label>M (noise draws)</mat-label>
        <input matInput type="number" formControlName="M" min="64" max="4096" />
        <mat-hint>per step, for the mutual information, 64–4096</mat-hint>
        <mat-error>Give M as a whole number from 64 to 4096.</mat-error>
      </mat-form-field>
      <mat-form-field>
        <mat-label>Samples</mat-label>
        <input matInput type="number" formControlName="sampleCount" min="10" max="20000" />
        <mat-hint>generated words, 10–20000</mat-hint>
        <mat-error>Give 10 to 20000 samples.</mat-error>
      </mat-form-field>
      <mat-form-field>
        <mat-label>Seed</mat-label>
        <input matInput type="number" formControlName="seed" min="0" />
        <mat-hint>same seed, same figures</mat-hint>
        <mat-error>Give the seed as a whole number of 0 or more.</mat-error>
      </mat-form-field>
      <mat-form-field class="wide">
        <mat-label>GRU baseline</mat-label>
        <mat-select formControlName="baselineRunId">
          <mat-option [value]="null">None</mat-option>
          @for (b of baselines(); track b.runId) { <mat-option [value]="b.runId">{{ b.label }}</mat-option> }
        </mat-select>
        <mat-hint>a GRU run of the same corpus, compared on the same words</mat-hint>
      </mat-form-field>
      <div class="nw-actions wide">
        <button mat-flat-button type="submit" [disabled]="busy()" data-testid="evaluate">
          <mat-icon>analytics</mat-icon> Evaluate
        </button>
        @if (form.invalid && form.touched) { <span class="nw-muted" role="status">Correct the marked fields first.</span> }
      </div>
    </form>
  `,
  styles: `
    .grid { display: grid; grid-template-columns: repeat(auto-fill, minmax(200px, 1fr)); gap: 4px 16px; }
    .wide { grid-column: 1 / -1; }
    .wide.mat-mdc-form-field { max-width: 420px; }
  `,
})
export class EvaluationSettingsForm {
  readonly baselines = input<BaselineChoice[]>([]);
  readonly busy = input(false);
  readonly evaluate = output<EvaluationSettingsInput>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    K: [256, whole(64, 1024)],
    repeats: [3, whole(1, 10)],
    S: [1024, whole(16, 16384)],
    M: [64, whole(64, 4096)],
    sampleCount: [1000, whole(10, 20000)],
    seed: [1, whole(0, 2 ** 31 - 1)],
    baselineRunId: [null as string | null],
  });

  protected submit(): void {
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    const v = this.form.getRawValue();
    this.evaluate.emit({
      K: Number(v.K), repeats: Number(v.repeats), S: Number(v.S), M: Number(v.M), sampleCount: Number(v.sampleCount),
      seed: Number(v.seed), baselineRunId: v.baselineRunId,
    });
  }
}
