import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { Router } from '@angular/router';
import { CurrentBench } from '../../benches/current-bench';
import { roleAtLeast } from '../../core/api-types';
import { LearnabilityDialog, type LearnabilityDialogData } from './learnability-dialog';

/** "Check learnability" on a corpus page (members and up): asks for the budget, then opens the check's grid page. */
@Component({
  selector: 'nw-learnability-button',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule],
  template: `@if (allowed()) { <button mat-stroked-button type="button" (click)="open()"><mat-icon>fact_check</mat-icon> Check learnability</button> }`,
})
export class LearnabilityButton {
  readonly benchId = input.required<string>();
  readonly corpusId = input.required<string>();
  readonly corpusName = input.required<string>();
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  private readonly bench = inject(CurrentBench);
  protected readonly allowed = computed(() => roleAtLeast(this.bench.current()?.role ?? 'viewer', 'member'));

  protected open(): void {
    const data: LearnabilityDialogData = { benchId: this.benchId(), corpusId: this.corpusId(), corpusName: this.corpusName() };
    this.dialog.open<LearnabilityDialog, LearnabilityDialogData, string | null>(LearnabilityDialog, { data, width: '520px' })
      .afterClosed()
      .subscribe((gridId) => { if (gridId) void this.router.navigate(['/benches', this.benchId(), 'grids', gridId]); });
  }
}
