import { ChangeDetectionStrategy, Component, inject, input, output, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators, type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_FORM_FIELD_DEFAULT_OPTIONS, MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { EvaluationSettingsInput } from '../../../../shared/api/evaluations';

export interface BaselineChoice { runId: string; label: string }

const whole = (min: number, max: number) => [Validators.required, Validators.min(min), Validators.max(max), Validators.pattern(/^\d+$/)];

/** Prefixes as typed: comma-separated, blanks dropped. */
export function parsePrefixes(text: string): string[] {
  return text.split(',').map((p) => p.trim()).filter((p) => p.length > 0);
}

/**
 * At most 20 prefixes of at most 60 characters (the server's schema), each made of characters of the run's
 * alphabet when it is known (the worker cannot complete a prefix with a character the model never saw).
 */
export function prefixesValidator(alphabet: () => readonly string[] | null): ValidatorFn {
  return (control: AbstractControl<string>): ValidationErrors | null => {
    const list = parsePrefixes(control.value ?? '');
    if (list.length > 20) return { prefixes: `Give at most 20 prefixes (there are ${list.length}).` };
    const long = list.find((p) => p.length > 60);
    if (long) return { prefixes: `Keep each prefix to 60 characters ("${long.slice(0, 12)}…" is longer).` };
    const chars = alphabet();
    if (chars && chars.length > 0) {
      const known = new Set(chars);
      for (const p of list) {
        const bad = Array.from(p).find((c) => !known.has(c));
        if (bad !== undefined) return { prefixes: `The prefix "${p}" uses "${bad}", which is not in the corpus alphabet; remove it or change the prefix.` };
      }
    }
    return null;
  };
}

/** Controls shown under "More settings" (opened by itself when one of them stops Evaluate). */
const MORE = ['maxHeldOut', 'detailWords', 'crossEntropyK', 'tMax', 'particles', 'prefixes'] as const;

/**
 * What the person chooses before "Evaluate": the held-out split and the order of the Kneser–Ney baseline, the
 * budgets of every figure, the seed and an optional GRU baseline; under "More settings" the held-out and detail
 * word caps, the second cross-entropy estimate, the sample length limit, the completion particles and prefixes.
 * The defaults are the server's (shared/api/evaluations.ts) and those of `npm run evaluate`.
 */
@Component({
  selector: 'nw-evaluation-settings',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule],
  // Hints wrap under their field instead of being cut off at the field's width.
  providers: [{ provide: MAT_FORM_FIELD_DEFAULT_OPTIONS, useValue: { subscriptSizing: 'dynamic' } }],
  template: `
    <form [formGroup]="form" (ngSubmit)="submit()" class="grid" aria-label="Evaluation settings">
      <mat-form-field>
        <mat-label>Held-out split</mat-label>
        <mat-select formControlName="heldOutSplit" data-testid="held-out-split">
          <mat-option value="validation">Validation</mat-option>
          <mat-option value="test">Test</mat-option>
        </mat-select>
        <mat-hint>the words every figure is scored on</mat-hint>
        <mat-error>Choose the held-out split: validation or test.</mat-error>
      </mat-form-field>
      <mat-form-field>
        <mat-label>N-gram baseline order</mat-label>
        <input matInput type="number" formControlName="ngramOrder" min="1" max="6" />
        <mat-hint>Kneser–Ney on the training words, 1–6</mat-hint>
        <mat-error>Give the n-gram order as a whole number from 1 to 6.</mat-error>
      </mat-form-field>
      <mat-form-field>
        <mat-label>K (tight estimate)</mat-label>
        <input matInput type="number" formControlName="K" min="64" max="1024" />
        <mat-hint>importance samples per word, 64–1024</mat-hint>
        <mat-error>Give K as a whole number from 64 to 1024.</mat-error>
      </mat-form-field>
      <mat-form-field>
        <mat-label>Repeats</mat-label>
        <input matInput type="number" formControlName="repeats" min="1" max="10" />
        <mat-hint>for the standard error between repeats, 1–10</mat-hint>
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
        <mat-select formControlName="baselineRunId" data-testid="gru-baseline">
          <mat-option [value]="null">None</mat-option>
          @for (b of baselines(); track b.runId) { <mat-option [value]="b.runId">{{ b.label }}</mat-option> }
        </mat-select>
        <mat-hint>a GRU run of the same corpus, compared on the same words</mat-hint>
      </mat-form-field>

      <div class="wide">
        <button mat-button type="button" (click)="more.set(!more())" [attr.aria-expanded]="more()" data-testid="more-settings">
          <mat-icon>{{ more() ? 'expand_less' : 'expand_more' }}</mat-icon> More settings
        </button>
      </div>
      @if (more()) {
        <mat-form-field>
          <mat-label>Held-out words scored</mat-label>
          <input matInput type="number" formControlName="maxHeldOut" min="1" max="100000" />
          <mat-hint>all when the split has fewer; else a hash-random subset, the same for every run (1–100000)</mat-hint>
          <mat-error>Give the held-out words as a whole number from 1 to 100000.</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Detail words</mat-label>
          <input matInput type="number" formControlName="detailWords" min="1" max="5000" />
          <mat-hint>words with per-step figures, 1–5000</mat-hint>
          <mat-error>Give the detail words as a whole number from 1 to 5000.</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>K of the second cross entropy</mat-label>
          <input matInput type="number" formControlName="crossEntropyK" min="0" max="1024" />
          <mat-hint>IWAE check of the cross entropy, 0 = skip, up to 1024</mat-hint>
          <mat-error>Give this K as a whole number from 0 (skip) to 1024.</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Longest sample</mat-label>
          <input matInput type="number" formControlName="tMax" min="2" max="200" />
          <mat-hint>characters per sampled word, 2–200</mat-hint>
          <mat-error>Give the longest sample as a whole number from 2 to 200 characters.</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Particles</mat-label>
          <input matInput type="number" formControlName="particles" min="16" max="100000" />
          <mat-hint>for the stored completions, 16–100000</mat-hint>
          <mat-error>Give the particles as a whole number from 16 to 100000.</mat-error>
        </mat-form-field>
        <mat-form-field class="wide">
          <mat-label>Completion prefixes</mat-label>
          <input matInput formControlName="prefixes" autocomplete="off" />
          <mat-hint>comma-separated, at most 20; their completions are stored with the figures</mat-hint>
          <mat-error>{{ form.controls.prefixes.errors?.['prefixes'] }}</mat-error>
        </mat-form-field>
      }
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
  /** The run's alphabet, to check completion prefixes before any compute (null: not checked here). */
  readonly alphabet = input<readonly string[] | null>(null);
  readonly evaluate = output<EvaluationSettingsInput>();

  protected readonly more = signal(false);

  protected readonly form = inject(NonNullableFormBuilder).group({
    heldOutSplit: ['test' as 'validation' | 'test', Validators.required],
    ngramOrder: [3, whole(1, 6)],
    K: [256, whole(64, 1024)],
    repeats: [3, whole(1, 10)],
    S: [1024, whole(16, 16384)],
    M: [64, whole(64, 4096)],
    sampleCount: [1000, whole(10, 20000)],
    seed: [1, whole(0, 2 ** 31 - 1)],
    baselineRunId: [null as string | null],
    maxHeldOut: [500, whole(1, 100_000)],
    detailWords: [100, whole(1, 5000)],
    crossEntropyK: [16, whole(0, 1024)],
    tMax: [24, whole(2, 200)],
    particles: [512, whole(16, 100_000)],
    prefixes: ['', prefixesValidator(() => this.alphabet())],
  });

  protected submit(): void {
    this.form.markAllAsTouched();
    this.form.controls.prefixes.updateValueAndValidity();
    if (this.form.invalid) {
      if (MORE.some((k) => this.form.controls[k].invalid)) this.more.set(true);
      return;
    }
    const v = this.form.getRawValue();
    this.evaluate.emit({
      heldOutSplit: v.heldOutSplit, ngramOrder: Number(v.ngramOrder),
      K: Number(v.K), repeats: Number(v.repeats), S: Number(v.S), M: Number(v.M), sampleCount: Number(v.sampleCount),
      seed: Number(v.seed), baselineRunId: v.baselineRunId,
      maxHeldOut: Number(v.maxHeldOut), detailWords: Number(v.detailWords), crossEntropyK: Number(v.crossEntropyK),
      tMax: Number(v.tMax), particles: Number(v.particles), prefixes: parsePrefixes(v.prefixes),
    });
  }
}
