import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialog, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { firstValueFrom } from 'rxjs';
import { notBlank } from '../form-messages';

export interface ReportTitleData {
  /** A title made from what the report holds; the person may keep or change it. */
  suggested: string;
}

/** Asks for the title of a new report before anything is saved. Closes with the trimmed title, or nothing. */
@Component({
  selector: 'nw-report-title-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatButtonModule, MatFormFieldModule, MatInputModule],
  template: `
    <h2 mat-dialog-title>Create a report</h2>
    <form [formGroup]="form" (ngSubmit)="save()">
      <mat-dialog-content>
        <p>The report keeps these figures as they are now, for printing and for the CSV and JSON downloads.</p>
        <mat-form-field class="title" subscriptSizing="dynamic">
          <mat-label>Report title</mat-label>
          <input matInput formControlName="title" maxlength="160" cdkFocusInitial data-testid="report-title-input" />
          <mat-hint>At most 160 characters; shown on the report and in the list of reports.</mat-hint>
          <mat-error>Give the report a title (at most 160 characters).</mat-error>
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" [mat-dialog-close]="undefined">Cancel</button>
        <button mat-flat-button type="submit">Create report</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `.title { width: min(520px, 80vw); }`,
})
export class ReportTitleDialog {
  private readonly data = inject<ReportTitleData>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<ReportTitleDialog, string>>(MatDialogRef);
  protected readonly form = inject(NonNullableFormBuilder).group({
    title: [this.data.suggested.slice(0, 160), [Validators.required, Validators.maxLength(160), notBlank]],
  });

  protected save(): void {
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    this.ref.close(this.form.controls.title.value.trim());
  }
}

/** Opens the dialog; resolves with the chosen title, or null when the person cancelled. */
export async function askReportTitle(dialog: MatDialog, suggested: string): Promise<string | null> {
  const ref = dialog.open<ReportTitleDialog, ReportTitleData, string>(ReportTitleDialog, { data: { suggested } });
  return (await firstValueFrom(ref.afterClosed())) ?? null;
}
