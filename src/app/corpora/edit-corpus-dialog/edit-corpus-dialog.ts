import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { ApiError, messageOf } from '../../core/api-error';
import { applyServerErrors, controlMessage, notBlank } from '../../ui/form-messages';
import { CorporaApi, type CorpusDetail } from '../corpora-api';

export interface EditCorpusData {
  benchId: string;
  corpus: CorpusDetail;
}

/** Renames and describes a corpus; closes with the updated corpus. */
@Component({
  selector: 'nw-edit-corpus-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatButtonModule, MatFormFieldModule, MatInputModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>Rename or describe</h2>
    <form [formGroup]="form" (ngSubmit)="save()">
      <mat-dialog-content class="nw-form">
        <mat-form-field>
          <mat-label>Name</mat-label>
          <input matInput formControlName="name" maxlength="80" />
          @if (form.controls.name.invalid) { <mat-error>{{ controlMessage(form.controls.name, 'a name') }}</mat-error> }
        </mat-form-field>
        <mat-form-field>
          <mat-label>Description</mat-label>
          <textarea matInput formControlName="description" rows="3" maxlength="500"></textarea>
          @if (form.controls.description.invalid) { <mat-error>{{ controlMessage(form.controls.description, 'a description') }}</mat-error> }
        </mat-form-field>
        @if (problem(); as message) { <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div> }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="saving()">Save changes</button>
      </mat-dialog-actions>
    </form>
  `,
})
export class EditCorpusDialog {
  private readonly data = inject<EditCorpusData>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<EditCorpusDialog, CorpusDetail>>(MatDialogRef);
  private readonly api = inject(CorporaApi);
  protected readonly controlMessage = controlMessage;
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly form = inject(NonNullableFormBuilder).group({
    name: [this.data.corpus.name, [Validators.required, Validators.maxLength(80), notBlank]],
    description: [this.data.corpus.description, [Validators.maxLength(500)]],
  });

  protected async save(): Promise<void> {
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    this.saving.set(true);
    try {
      const { name, description } = this.form.getRawValue();
      this.ref.close(await this.api.update(this.data.benchId, this.data.corpus.id, { name: name.trim(), description: description.trim() }));
    } catch (error) {
      if (error instanceof ApiError && error.status === 422) {
        const unmatched = applyServerErrors(this.form, error.fields);
        this.problem.set(unmatched.length > 0 ? unmatched.join(' ') : null);
      } else {
        this.problem.set(`Nothing was changed. ${messageOf(error)}`);
      }
    } finally {
      this.saving.set(false);
    }
  }
}
