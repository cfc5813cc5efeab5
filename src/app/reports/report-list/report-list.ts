import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, effect, inject, input, signal, untracked } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { ReportKind, ReportSummaryDto } from '../../../../shared/api/reports';
import { messageOf } from '../../core/api-error';
import { ReportsApi } from '../reports-api';

const KIND_LABELS: Record<ReportKind, string> = { evaluation: 'Evaluation', comparison: 'Comparison of runs', grid: 'Grid' };

/** The saved reports of a bench, newest first, paged on the server; each title opens the report. */
@Component({
  selector: 'nw-report-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, RouterLink, MatTableModule, MatPaginatorModule, MatIconModule, MatProgressBarModule],
  templateUrl: './report-list.html',
  styles: `.title-cell a { font-weight: 500; }`,
})
export class ReportList {
  readonly benchId = input.required<string>();
  private readonly api = inject(ReportsApi);

  protected readonly columns = ['title', 'kind', 'createdBy', 'createdAt'];
  protected readonly page = signal({ index: 0, size: 25 });
  protected readonly rows = signal<ReportSummaryDto[]>([]);
  protected readonly total = signal(0);
  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  /** Answers of older requests that arrive late are ignored. */
  private request = 0;

  constructor() {
    effect(() => {
      this.benchId(); // a new bench starts at the first page
      untracked(() => {
        if (this.page().index !== 0) this.page.update((p) => ({ ...p, index: 0 }));
      });
    });
    effect(() => {
      const [benchId, page] = [this.benchId(), this.page()];
      untracked(() => void this.load(benchId, page));
    });
  }

  private async load(benchId: string, page: { index: number; size: number }): Promise<void> {
    const mine = ++this.request;
    this.loading.set(true);
    try {
      const answer = await this.api.list(benchId, { limit: page.size, offset: page.index * page.size });
      if (mine !== this.request) return;
      this.rows.set(answer.items);
      this.total.set(answer.total);
      this.problem.set(null);
    } catch (error) {
      if (mine !== this.request) return;
      this.problem.set(`The reports could not be loaded. ${messageOf(error)}`);
    } finally {
      if (mine === this.request) this.loading.set(false);
    }
  }

  protected kindLabel(kind: ReportKind): string {
    return KIND_LABELS[kind];
  }

  protected onPage(event: PageEvent): void {
    this.page.set({ index: event.pageIndex, size: event.pageSize });
  }
}
