import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, OnInit, effect, inject, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import { messageOf } from '../../core/api-error';
import { BenchSummary } from '../../core/api-types';
import { Notice } from '../../core/notice';
import { RoleLabelPipe } from '../../ui/role-label';
import { CreateBenchDialog } from '../create-bench-dialog/create-bench-dialog';
import { CurrentBench } from '../current-bench';

/** `/benches`: the benches I am on (all of them for the admin), with a button to create one. */
@Component({
  selector: 'nw-bench-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    RouterLink, DatePipe, MatTableModule, MatSortModule, MatPaginatorModule, MatButtonModule, MatIconModule,
    MatProgressBarModule, RoleLabelPipe,
  ],
  templateUrl: './bench-list.html',
  styles: `.nw-title-row { display: flex; align-items: center; justify-content: space-between; gap: 16px; flex-wrap: wrap; }
    .mat-column-name { min-width: 200px; } tr.mat-mdc-row:hover { background: var(--mat-sys-surface-container-low); }`,
})
export class BenchList implements OnInit {
  private readonly store = inject(CurrentBench);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  protected readonly columns = ['name', 'role', 'memberCount', 'createdAt'];
  protected readonly dataSource = new MatTableDataSource<BenchSummary>([]);
  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  protected readonly count = signal(0);

  constructor() {
    effect(() => {
      const sort = this.sort();
      const paginator = this.paginator();
      if (sort) this.dataSource.sort = sort;
      if (paginator) this.dataSource.paginator = paginator;
    });
    this.dataSource.sortingDataAccessor = (bench, column) => {
      switch (column) {
        case 'name': return bench.name.toLowerCase();
        case 'role': return bench.role;
        case 'memberCount': return bench.memberCount;
        default: return bench.createdAt;
      }
    };
  }

  async ngOnInit(): Promise<void> {
    await this.load();
  }

  protected async load(): Promise<void> {
    this.loading.set(true);
    this.problem.set(null);
    try {
      const benches = await this.store.refreshList();
      this.dataSource.data = benches;
      this.count.set(benches.length);
    } catch (error) {
      this.problem.set(`Could not load your benches. ${messageOf(error)}`);
    } finally {
      this.loading.set(false);
    }
  }

  protected openCreate(): void {
    this.dialog.open(CreateBenchDialog, { autoFocus: 'first-tabbable' }).afterClosed().subscribe((bench) => {
      if (!bench) return;
      this.notice.done(`Bench “${bench.name}” created.`);
      void this.router.navigate(['/benches', bench.id]);
    });
  }
}
