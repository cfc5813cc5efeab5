import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { Router, RouterLink } from '@angular/router';
import { messageOf } from '../../core/api-error';
import { BenchSummary } from '../../core/api-types';
import { Notice } from '../../core/notice';
import { ConfirmDialog, ConfirmDialogData } from '../../ui/confirm-dialog/confirm-dialog';
import { controlMessage, notBlank, formProblem } from '../../ui/form-messages';
import { CorporaApi } from '../../corpora/corpora-api';
import { GridsApi } from '../../grids/grids-api';
import { ReportsApi } from '../../reports/reports-api';
import { RunsApi } from '../../runs/runs-api';
import { BenchesApi } from '../benches-api';

export interface BenchCounts { corpora: number; runs: number; grids: number; reports: number }
import { CurrentBench } from '../current-bench';

/** Name, description and the owner's rename / delete controls. */
@Component({
  selector: 'nw-bench-overview',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, RouterLink, DatePipe, MatButtonModule, MatFormFieldModule, MatInputModule, MatIconModule],
  templateUrl: './bench-overview.html',
  styles: `:host { display: block; padding-top: 16px; } .nw-wide { width: 100%; max-width: 560px; }
    .nw-facts { display: grid; grid-template-columns: max-content 1fr; gap: 6px 24px; margin: 0; }
    .nw-facts dt { color: var(--mat-sys-on-surface-variant); } .nw-facts dd { margin: 0; }
    .nw-links { display: flex; gap: 12px; flex-wrap: wrap; }`,
})
export class BenchOverview {
  readonly bench = input.required<BenchSummary>();

  private readonly api = inject(BenchesApi);
  private readonly store = inject(CurrentBench);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  private readonly corpora = inject(CorporaApi);
  private readonly runs = inject(RunsApi);
  private readonly grids = inject(GridsApi);
  private readonly reports = inject(ReportsApi);
  /** How much the bench holds (null while loading or when a count could not be read). */
  protected readonly counts = signal<BenchCounts | null>(null);
  protected readonly isOwner = computed(() => this.bench().role === 'owner');
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly controlMessage = controlMessage;
  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, Validators.maxLength(80), notBlank]],
    description: ['', [Validators.maxLength(500)]],
  });

  constructor() {
    effect(() => {
      const { name, description } = this.bench();
      this.form.reset({ name, description });
    });
    effect(() => {
      const id = this.bench().id;
      untracked(() => void this.loadCounts(id));
    });
  }

  private async loadCounts(benchId: string): Promise<void> {
    try {
      const [corpora, runs, grids, reports] = await Promise.all([
        this.corpora.list(benchId), this.runs.list(benchId, { limit: 1 }), this.grids.list(benchId), this.reports.list(benchId, { limit: 1, offset: 0 }),
      ]);
      if (this.bench().id === benchId) this.counts.set({ corpora: corpora.length, runs: runs.total, grids: grids.length, reports: reports.total });
    } catch {
      this.counts.set(null); // the shortcuts still work; each page says what went wrong
    }
  }

  protected async save(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { name, description } = this.form.getRawValue();
    try {
      const updated = await this.api.update(this.bench().id, { name: name.trim(), description: description.trim() });
      this.store.replace({ ...this.bench(), ...updated });
      this.notice.done('Bench saved.');
    } catch (error) {
      this.problem.set(formProblem(error, this.form, 'The bench was not saved.'));
    } finally {
      this.busy.set(false);
    }
  }

  protected confirmDelete(): void {
    const bench = this.bench();
    const data: ConfirmDialogData = {
      title: `Delete “${bench.name}”?`,
      message: 'This removes the bench with its members, invitations, corpora, runs and checkpoints for everyone. It cannot be undone.',
      confirmLabel: 'Delete bench',
      destructive: true,
    };
    this.dialog.open(ConfirmDialog, { data }).afterClosed().subscribe(async (confirmed) => {
      if (confirmed !== true) return;
      try {
        await this.api.remove(bench.id);
        this.store.forget(bench.id);
        this.notice.done(`Bench “${bench.name}” deleted.`);
        await this.router.navigate(['/benches']);
      } catch (error) {
        this.problem.set(`The bench was not deleted. ${messageOf(error)}`);
      }
    });
  }
}
