import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatTableModule } from '@angular/material/table';
import { unitNote } from '../../../../shared/api/figure-names';
import type { RunDto } from '../../../../shared/api/runs';
import { formatValue, type CompareRow } from '../compare-rows';

/**
 * Runs side by side: one column per run, one row per setting or figure. Rows where the runs differ are
 * highlighted (amber edge and a "differs" mark), so the reader sees at once what was changed.
 */
@Component({
  selector: 'nw-compare-table',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatTableModule],
  template: `
    <div class="nw-table-wrap">
      <table mat-table [dataSource]="rows()" aria-label="Runs side by side" class="compare">
        <ng-container matColumnDef="label">
          <th mat-header-cell *matHeaderCellDef>Setting or figure</th>
          <td mat-cell *matCellDef="let row" [class.figure]="row.group === 'figure'">
            {{ row.label }}@if (row.unit) {<span class="nw-unit">({{ unitNote(row.unit) }})</span>}
            @if (row.differs) { <span class="differs-mark">differs</span> }
          </td>
        </ng-container>
        @for (run of runs(); track run.id; let i = $index) {
          <ng-container [matColumnDef]="'run' + i">
            <th mat-header-cell *matHeaderCellDef class="nw-num run-head">{{ run.name }}</th>
            <td mat-cell *matCellDef="let row" class="run-cell" [class.nw-num]="isNumber(row.values[i])">{{ show(row, row.values[i]) }}</td>
          </ng-container>
        }
        <tr mat-header-row *matHeaderRowDef="columns()"></tr>
        <tr mat-row *matRowDef="let row; columns: columns()" [class.differs]="row.differs" [attr.data-differs]="row.differs"></tr>
      </table>
    </div>
  `,
  styles: `
    .compare { min-width: 100%; }
    tr.differs td { background: var(--nw-live-container); }
    tr.differs td:first-child { box-shadow: inset 4px 0 0 var(--nw-live); }
    .differs-mark { margin-left: 8px; font-size: 0.75em; text-transform: uppercase; letter-spacing: 0.04em; color: #6a4500; }
    td.figure { font-weight: 500; }
    .run-head { max-width: 14em; overflow: hidden; text-overflow: ellipsis; }
    /* One alignment per column: words and numbers of a run both sit on the right edge. */
    .run-cell { text-align: right; }
    @media print { tr.differs td { background: #eee; } }
  `,
})
export class CompareTable {
  readonly runs = input.required<Pick<RunDto, 'id' | 'name'>[]>();
  readonly rows = input.required<CompareRow[]>();
  protected readonly unitNote = unitNote;
  protected readonly columns = computed(() => ['label', ...this.runs().map((_, i) => `run${i}`)]);
  protected show(row: CompareRow, v: string | number | null): string { return formatValue(row, v); }
  protected isNumber(v: unknown): boolean { return typeof v === 'number'; }
}
