import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, effect, inject, input, signal, untracked } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { messageOf } from '../../core/api-error';
import { ActivityEvent, BenchSummary } from '../../core/api-types';
import { BenchesApi } from '../benches-api';

/** What happened on the bench, newest first, paged on the server (coaches and owners). */
@Component({
  selector: 'nw-bench-activity',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, MatTableModule, MatPaginatorModule, MatProgressBarModule, MatIconModule],
  template: `
    @if (loading()) { <mat-progress-bar mode="indeterminate" aria-label="Loading activity" /> }
    @if (problem(); as message) {
      <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div>
    }
    <div class="nw-table-wrap">
      <table mat-table [dataSource]="items()" aria-label="Activity on the bench">
        <ng-container matColumnDef="createdAt">
          <th mat-header-cell *matHeaderCellDef class="nw-num">When</th>
          <td mat-cell *matCellDef="let e" class="nw-num">{{ e.createdAt | date: 'yyyy-MM-dd HH:mm:ss' }}</td>
        </ng-container>
        <ng-container matColumnDef="actor">
          <th mat-header-cell *matHeaderCellDef>Who</th>
          <td mat-cell *matCellDef="let e">{{ e.actor?.displayName ?? '(deleted account)' }}</td>
        </ng-container>
        <ng-container matColumnDef="summary">
          <th mat-header-cell *matHeaderCellDef>What</th>
          <td mat-cell *matCellDef="let e">{{ e.summary }}</td>
        </ng-container>
        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns"></tr>
      </table>
      @if (!loading() && items().length === 0 && !problem()) { <div class="nw-empty">Nothing has happened yet.</div> }
      <mat-paginator [length]="total()" [pageSize]="pageSize()" [pageIndex]="pageIndex()"
                     [pageSizeOptions]="[20, 50, 100]" (page)="onPage($event)" aria-label="Pages of activity" />
    </div>
  `,
  styles: `:host { display: block; padding-top: 16px; } .mat-column-createdAt { width: 180px; } .mat-column-actor { width: 180px; }`,
})
export class BenchActivity {
  readonly bench = input.required<BenchSummary>();

  private readonly api = inject(BenchesApi);
  protected readonly columns = ['createdAt', 'actor', 'summary'];
  protected readonly items = signal<ActivityEvent[]>([]);
  protected readonly total = signal(0);
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(20);
  protected readonly loading = signal(false);
  protected readonly problem = signal<string | null>(null);

  constructor() {
    effect(() => {
      const id = this.bench().id;
      untracked(() => {
        this.pageIndex.set(0);
        void this.load(id);
      });
    });
  }

  protected onPage(event: PageEvent): void {
    this.pageIndex.set(event.pageIndex);
    this.pageSize.set(event.pageSize);
    void this.load(this.bench().id);
  }

  private async load(benchId: string): Promise<void> {
    this.loading.set(true);
    try {
      const page = await this.api.activity(benchId, this.pageSize(), this.pageIndex() * this.pageSize());
      this.items.set(page.items);
      this.total.set(page.total);
      this.problem.set(null);
    } catch (error) {
      this.problem.set(`Could not load the activity. ${messageOf(error)}`);
    } finally {
      this.loading.set(false);
    }
  }
}
