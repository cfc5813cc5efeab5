import { DatePipe } from '@angular/common';
import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, OnInit, effect, inject, signal, viewChild } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { firstValueFrom } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { User } from '../../core/api-types';
import { AppConfigStore } from '../../core/app-config-store';
import { CapturedMailList } from '../captured-mail/captured-mail';

/** `/admin`: every account on this instance and, in development, the captured mail. */
@Component({
  selector: 'nw-admin-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, MatTableModule, MatSortModule, MatPaginatorModule, MatIconModule, CapturedMailList],
  template: `
    <section class="nw-page">
      <h1 class="nw-page-title">Admin</h1>
      <p class="nw-page-lead">Accounts on this Noisewright instance. Names and e-mail addresses are personal data: keep them here.</p>
      @if (problem(); as message) {
        <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div>
      }
      <div class="nw-table-wrap">
        <table mat-table [dataSource]="users" matSort matSortActive="createdAt" matSortDirection="desc" aria-label="Accounts">
          <ng-container matColumnDef="displayName">
            <th mat-header-cell *matHeaderCellDef mat-sort-header>Name</th>
            <td mat-cell *matCellDef="let u">{{ u.displayName }}</td>
          </ng-container>
          <ng-container matColumnDef="email">
            <th mat-header-cell *matHeaderCellDef mat-sort-header>E-mail</th>
            <td mat-cell *matCellDef="let u">{{ u.email }}</td>
          </ng-container>
          <ng-container matColumnDef="isAdmin">
            <th mat-header-cell *matHeaderCellDef mat-sort-header>Admin</th>
            <td mat-cell *matCellDef="let u">{{ u.isAdmin ? 'yes' : 'no' }}</td>
          </ng-container>
          <ng-container matColumnDef="createdAt">
            <th mat-header-cell *matHeaderCellDef mat-sort-header class="nw-num">Created</th>
            <td mat-cell *matCellDef="let u" class="nw-num">{{ u.createdAt | date: 'yyyy-MM-dd HH:mm' }}</td>
          </ng-container>
          <tr mat-header-row *matHeaderRowDef="columns"></tr>
          <tr mat-row *matRowDef="let row; columns: columns"></tr>
        </table>
        <mat-paginator [pageSizeOptions]="[20, 50, 100]" aria-label="Pages of accounts" />
      </div>
      @if (appConfig.config()?.devMode) {
        <nw-captured-mail />
      }
    </section>
  `,
})
export class AdminPage implements OnInit {
  private readonly http = inject(HttpClient);
  protected readonly appConfig = inject(AppConfigStore);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);
  protected readonly users = new MatTableDataSource<User>([]);
  protected readonly columns = ['displayName', 'email', 'isAdmin', 'createdAt'];
  protected readonly problem = signal<string | null>(null);

  constructor() {
    effect(() => {
      const sort = this.sort();
      const paginator = this.paginator();
      if (sort) this.users.sort = sort;
      if (paginator) this.users.paginator = paginator;
    });
  }

  async ngOnInit(): Promise<void> {
    void this.appConfig.load();
    try {
      this.users.data = await firstValueFrom(this.http.get<User[]>('/api/admin/users'));
    } catch (error) {
      this.problem.set(`Could not load the accounts. ${messageOf(error)}`);
    }
  }
}
