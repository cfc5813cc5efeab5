import { ChangeDetectionStrategy, Component, DestroyRef, OnInit, inject, output } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { AbstractControl, NonNullableFormBuilder, ReactiveFormsModule, ValidationErrors, ValidatorFn, Validators } from '@angular/forms';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { CorpusOptionsInput } from '../corpora-api';

/** Longest word the server accepts as a maximum (shared/api/corpora.ts MAX_WORD_LENGTH_LIMIT). */
export const MAX_WORD_LENGTH_LIMIT = 200;

/** Group validator: the three split percentages add up to 100 (error `sum` on the group). */
const sharesAddUp: ValidatorFn = (group: AbstractControl): ValidationErrors | null => {
  const v = group.value as { train: number | null; validation: number | null; test: number | null };
  if (v.train === null || v.validation === null || v.test === null) return null;
  const sum = Number(v.train) + Number(v.validation) + Number(v.test);
  return Math.abs(sum - 100) > 1e-6 ? { sum: `The shares add up to ${Math.round(sum * 100) / 100} %; make them add up to 100 %.` } : null;
};

/**
 * The options of an upload: format, duplicates, maximum word length, normalisation and split.
 * Emits the options whenever the form is valid, and `null` while it is not.
 */
@Component({
  selector: 'nw-upload-options-form',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatCheckboxModule, MatFormFieldModule, MatInputModule, MatSelectModule],
  templateUrl: './upload-options-form.html',
  styles: `
    .group { border: 0; padding: 0; margin: 0 0 8px; }
    .group legend { font: var(--mat-sys-title-small); margin-bottom: 4px; }
    .share { width: 130px; } .wide { width: 100%; max-width: 420px; } .narrow { width: 200px; }
    .checks { display: flex; flex-wrap: wrap; gap: 0 16px; margin-bottom: 8px; }
    .sum-error { color: var(--mat-sys-error); font: var(--mat-sys-body-small); margin: -8px 0 8px; }
  `,
})
export class UploadOptionsForm implements OnInit {
  readonly optionsChange = output<CorpusOptionsInput | null>();
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly destroyRef = inject(DestroyRef);
  protected readonly maxWordLengthLimit = MAX_WORD_LENGTH_LIMIT;

  readonly form = this.fb.group({
    format: this.fb.control<'' | 'txt' | 'tsv' | 'csv'>(''),
    mergeDuplicates: false,
    maxWordLength: this.fb.control<number | null>(40, [Validators.required, Validators.min(1), Validators.max(MAX_WORD_LENGTH_LIMIT), Validators.pattern(/^\d+$/)]),
    lowerCase: true,
    nfc: true,
    stripDiacritics: false,
    allowedChars: this.fb.control('', [Validators.maxLength(1000)]),
    outsideAlphabet: this.fb.control<'drop-word' | 'drop-char' | 'keep'>('drop-word'),
    split: this.fb.group(
      {
        train: this.fb.control<number | null>(80, [Validators.required, Validators.min(0), Validators.max(100)]),
        validation: this.fb.control<number | null>(10, [Validators.required, Validators.min(0), Validators.max(100)]),
        test: this.fb.control<number | null>(10, [Validators.required, Validators.min(0), Validators.max(100)]),
        seed: this.fb.control<number | null>(1, [Validators.required, Validators.min(0), Validators.max(2_147_483_647), Validators.pattern(/^\d+$/)]),
      },
      { validators: sharesAddUp },
    ),
  });

  ngOnInit(): void {
    this.form.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => this.optionsChange.emit(this.options()));
  }

  /** The options as the API takes them, or null while the form is invalid. */
  options(): CorpusOptionsInput | null {
    if (this.form.invalid) return null;
    const v = this.form.getRawValue();
    const pct = (x: number | null) => Math.round(Number(x) * 1e4) / 1e6;
    return {
      ...(v.format ? { format: v.format } : {}),
      mergeDuplicates: v.mergeDuplicates,
      maxWordLength: Number(v.maxWordLength),
      normalise: {
        lowerCase: v.lowerCase,
        nfc: v.nfc,
        stripDiacritics: v.stripDiacritics,
        allowedChars: v.allowedChars,
        outsideAlphabet: v.outsideAlphabet,
      },
      split: { train: pct(v.split.train), validation: pct(v.split.validation), test: pct(v.split.test), seed: Number(v.split.seed) },
    };
  }

  /** Switches on merging of duplicates (offered when the preview finds repeated words). */
  mergeDuplicates(): void {
    this.form.controls.mergeDuplicates.setValue(true);
  }

  protected message(control: AbstractControl, label: string, min: number, max: number): string {
    const e = control.errors;
    if (!e) return '';
    if (e['required']) return `Enter ${label}.`;
    if (e['pattern']) return `Enter ${label} as a whole number.`;
    if (e['min'] || e['max']) return `Enter ${label} from ${min} to ${max}.`;
    if (e['maxlength']) return 'List at most 1,000 characters.';
    return `Check ${label}.`;
  }

  protected get sumError(): string | null {
    const e = this.form.controls.split.errors;
    return e && typeof e['sum'] === 'string' ? e['sum'] : null;
  }
}
