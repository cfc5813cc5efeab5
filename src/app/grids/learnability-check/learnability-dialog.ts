import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { RunPlacement } from '../../../../shared/api/runners';
import { LEARNABILITY_NGRAM_ORDERS, LEARNABILITY_STATE_SIZES, LEARNABILITY_TOLERANCE_BITS } from '../../../../shared/api/grids';
import { PlacementChoice } from '../../runners/placement-choice/placement-choice';
import { formProblem } from '../../ui/form-messages';
import { GridsApi } from '../grids-api';

export interface LearnabilityDialogData { benchId: string; corpusId: string; corpusName: string }

/** Confirms a learnability check with its training budget; closes with the new grid's id once the server created it. */
@Component({
  selector: 'nw-learnability-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatButtonModule, MatDialogModule, MatFormFieldModule, MatIconModule, MatInputModule, PlacementChoice],
  template: `
    <h2 mat-dialog-title>Learnability check of {{ data.corpusName }}</h2>
    <mat-dialog-content>
      <p>Trains {{ runCount }} models {{ placement() === 'runners' ? 'on the runners' : "in this tab's queue" }} with the same budget: character n-grams of order
        {{ orders.join(', ') }}, and a teacher-forced GRU and a stochastic state-space model at state sizes {{ sizes.join(', ') }}.
        The verdict table says how far each is from the best n-gram and whether the state-space model is on par with the GRU
        (within {{ tolerance }} bits/char, the end of each word counted as one character) at each size.</p>
      <mat-form-field class="budget">
        <mat-label>Training steps per model</mat-label>
        <input matInput type="number" [formControl]="budget" />
        <mat-hint>Small budgets give a quick but rough verdict; 300–1,000 steps is a useful first look.</mat-hint>
        <mat-error>Give a whole number of steps from 1 to 100,000.</mat-error>
      </mat-form-field>
      <nw-placement-choice [benchId]="data.benchId" [(placement)]="placement" [preferRunners]="true" [plural]="true" />
      @if (problem(); as m) { <p class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ m }}</span></p> }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button [mat-dialog-close]="null">Cancel</button>
      <button mat-flat-button (click)="start()" [disabled]="busy()">Start the check</button>
    </mat-dialog-actions>
  `,
  styles: `.budget { width: 100%; margin-top: 8px; }`,
})
export class LearnabilityDialog {
  protected readonly data = inject<LearnabilityDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<LearnabilityDialog, string | null>);
  private readonly api = inject(GridsApi);
  protected readonly orders = LEARNABILITY_NGRAM_ORDERS;
  protected readonly sizes = LEARNABILITY_STATE_SIZES;
  protected readonly tolerance = LEARNABILITY_TOLERANCE_BITS;
  protected readonly runCount = LEARNABILITY_NGRAM_ORDERS.length + 2 * LEARNABILITY_STATE_SIZES.length;
  protected readonly budget = new FormControl(500, { nonNullable: true,
    validators: [Validators.required, Validators.min(1), Validators.max(100_000), Validators.pattern(/^\d+$/)] });
  private readonly group = new FormGroup({ budgetSteps: this.budget });
  protected readonly busy = signal(false);
  protected readonly placement = signal<RunPlacement>('tab');
  protected readonly problem = signal<string | null>(null);

  protected async start(): Promise<void> {
    this.budget.markAsTouched();
    if (this.budget.invalid) return;
    this.busy.set(true);
    try {
      const grid = await this.api.learnability(this.data.benchId, this.data.corpusId, { budgetSteps: +this.budget.value, placement: this.placement() });
      this.ref.close(grid.id);
    } catch (error) {
      this.problem.set(formProblem(error, this.group, 'The check was not started.'));
    } finally {
      this.busy.set(false);
    }
  }
}
