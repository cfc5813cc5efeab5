import { DatePipe, DecimalPipe, PercentPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { CurrentBench } from '../../benches/current-bench';
import { ApiError, messageOf } from '../../core/api-error';
import { ErrorCode } from '../../core/api-types';
import { Notice } from '../../core/notice';
import { ConfirmDialog, type ConfirmDialogData } from '../../ui/confirm-dialog/confirm-dialog';
import { CorporaApi, type CorpusDetail, type SplitName } from '../corpora-api';
import { CorpusCharts } from '../corpus-charts/corpus-charts';
import { CorpusWordsTable } from '../corpus-words-table/corpus-words-table';
import { EditCorpusDialog, type EditCorpusData } from '../edit-corpus-dialog/edit-corpus-dialog';
import { PersonalDataCaution } from '../personal-data-caution';
import { LearnabilityButton } from '../../grids/learnability-check/learnability-button';

/** `/benches/:benchId/corpora/:corpusId`: figures, charts and words of one corpus, and what can be done with it. */
@Component({
  selector: 'nw-corpus-detail',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    DatePipe, DecimalPipe, PercentPipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule,
    CorpusCharts, CorpusWordsTable, PersonalDataCaution, LearnabilityButton,
  ],
  templateUrl: './corpus-detail.html',
  styleUrl: './corpus-detail.scss',
})
export class CorpusDetailPage {
  readonly benchId = input.required<string>();
  readonly corpusId = input.required<string>();
  protected readonly store = inject(CurrentBench);
  private readonly api = inject(CorporaApi);
  private readonly dialog = inject(MatDialog);
  private readonly notice = inject(Notice);
  private readonly router = inject(Router);
  protected readonly corpus = signal<CorpusDetail | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly loading = signal(true);
  protected readonly splits: SplitName[] = ['train', 'validation', 'test'];

  constructor() {
    effect(() => {
      const benchId = this.benchId();
      const corpusId = this.corpusId();
      untracked(() => {
        void this.load(benchId, corpusId);
      });
    });
  }

  private async load(benchId: string, corpusId: string): Promise<void> {
    this.loading.set(true);
    try {
      this.corpus.set(await this.api.get(benchId, corpusId));
      this.problem.set(null);
    } catch (error) {
      this.corpus.set(null);
      this.problem.set(error instanceof ApiError && error.status === 404
        ? 'This corpus does not exist (it may have been deleted) or you are not a member of its bench. Go back to the list of corpora.'
        : `Could not load the corpus. ${messageOf(error)}`);
    } finally {
      this.loading.set(false);
    }
  }

  protected edit(corpus: CorpusDetail): void {
    const data: EditCorpusData = { benchId: this.benchId(), corpus };
    this.dialog.open(EditCorpusDialog, { data, width: '480px' }).afterClosed().subscribe((updated?: CorpusDetail) => {
      if (!updated) return;
      this.corpus.set(updated);
      this.notice.done('Saved the changes.');
    });
  }

  protected confirmDelete(corpus: CorpusDetail): void {
    const data: ConfirmDialogData = {
      title: `Delete “${corpus.name}”?`,
      message: `Its ${corpus.types.toLocaleString('en')} words and statistics are removed from the bench for everyone. This cannot be undone.`,
      confirmLabel: 'Delete corpus',
      destructive: true,
    };
    this.dialog.open(ConfirmDialog, { data }).afterClosed().subscribe((confirmed) => {
      if (confirmed === true) void this.remove(corpus, false);
    });
  }

  private async remove(corpus: CorpusDetail, confirmArchivedRuns: boolean): Promise<void> {
    try {
      await this.api.remove(this.benchId(), corpus.id, confirmArchivedRuns);
      this.notice.done(`Deleted "${corpus.name}".`);
      await this.router.navigate(['/benches', this.benchId(), 'corpora']);
    } catch (error) {
      // Only archived runs use it: the server wants an explicit second confirmation.
      if (!confirmArchivedRuns && error instanceof ApiError && error.code === ErrorCode.CorpusInUse && /archived run/.test(error.message)) {
        const data: ConfirmDialogData = { title: 'Archived runs use this corpus', message: error.message, confirmLabel: 'Delete anyway', destructive: true };
        this.dialog.open(ConfirmDialog, { data }).afterClosed().subscribe((again) => {
          if (again === true) void this.remove(corpus, true);
        });
        return;
      }
      this.problem.set(`"${corpus.name}" was not deleted. ${messageOf(error)}`);
    }
  }

  protected async exportTsv(corpus: CorpusDetail): Promise<void> {
    try {
      const blob = await this.api.exportTsv(this.benchId(), corpus.id);
      const url = URL.createObjectURL(blob);
      const a = document.createElement('a');
      a.href = url;
      a.download = `${corpus.name.replace(/[^\p{L}\p{N}._-]+/gu, '-') || 'corpus'}.tsv`;
      a.click();
      setTimeout(() => URL.revokeObjectURL(url), 1000);
    } catch (error) {
      this.notice.problem(`The export failed. ${messageOf(error)}`);
    }
  }
}
