import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { BenchSummary } from '../../core/api-types';
import { controlMessage, notBlank, formProblem } from '../../ui/form-messages';
import { BenchesApi } from '../benches-api';

/** Creates a bench; closes with the new BenchSummary. */
@Component({
  selector: 'nw-create-bench-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>New bench</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content>
        <p class="nw-muted">A bench is a shared space for a team: corpora, runs and comparisons. You become its owner.</p>
        @if (problem(); as message) {
          <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div>
        }
        <mat-form-field appearance="outline" class="nw-wide">
          <mat-label>Name</mat-label>
          <input matInput formControlName="name" cdkFocusInitial />
          <mat-error>{{ controlMessage(form.controls.name, 'a name for the bench') }}</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline" class="nw-wide">
          <mat-label>Description (optional)</mat-label>
          <textarea matInput formControlName="description" rows="3"></textarea>
          <mat-error>{{ controlMessage(form.controls.description, 'the description') }}</mat-error>
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="busy()">Create bench</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `.nw-wide { width: 100%; } mat-dialog-content { min-width: min(440px, 80vw); }`,
})
export class CreateBenchDialog {
  private readonly api = inject(BenchesApi);
  private readonly dialogRef = inject<MatDialogRef<CreateBenchDialog, BenchSummary>>(MatDialogRef);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly controlMessage = controlMessage;
  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, Validators.maxLength(80), notBlank]],
    description: ['', [Validators.maxLength(500)]],
  });

  protected async submit(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { name, description } = this.form.getRawValue();
    try {
      this.dialogRef.close(await this.api.create(name.trim(), description.trim()));
    } catch (error) {
      this.problem.set(formProblem(error, this.form, 'The bench was not created.'));
    } finally {
      this.busy.set(false);
    }
  }
}
