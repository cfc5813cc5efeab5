import { DatePipe, DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { CheckpointDto } from '../../../../shared/api/runs';

const REASONS: Record<CheckpointDto['reason'], string> = { auto: 'autosave', stop: 'on stop', manual: 'saved by hand', import: 'imported' };

/** The checkpoints of a run (newest first) with resume and download actions. */
@Component({
  selector: 'nw-run-checkpoints',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, DecimalPipe, MatButtonModule, MatIconModule, MatTableModule, RouterLink],
  template: `
    <div class="nw-table-wrap" data-testid="checkpoints">
      <table mat-table [dataSource]="checkpoints()" [trackBy]="byId" aria-label="Checkpoints of the run">
        <ng-container matColumnDef="step">
          <th mat-header-cell *matHeaderCellDef class="nw-num">Step</th>
          <td mat-cell *matCellDef="let c" class="nw-num">{{ c.step | number }}</td>
        </ng-container>
        <ng-container matColumnDef="bound">
          <th mat-header-cell *matHeaderCellDef class="nw-num">Bound</th>
          <td mat-cell *matCellDef="let c" class="nw-num">
            @if (c.boundBitsPerChar !== null) { {{ c.boundBitsPerChar | number: '1.3-3' }}<span class="nw-unit">bits/char</span> } @else { — }
          </td>
        </ng-container>
        <ng-container matColumnDef="reason">
          <th mat-header-cell *matHeaderCellDef>Why</th>
          <td mat-cell *matCellDef="let c">{{ reasonOf(c) }}</td>
        </ng-container>
        <ng-container matColumnDef="size">
          <th mat-header-cell *matHeaderCellDef class="nw-num">Size</th>
          <td mat-cell *matCellDef="let c" class="nw-num">{{ c.byteSize / 1024 | number: '1.0-0' }}<span class="nw-unit">KiB</span></td>
        </ng-container>
        <ng-container matColumnDef="createdAt">
          <th mat-header-cell *matHeaderCellDef class="nw-num">Saved</th>
          <td mat-cell *matCellDef="let c" class="nw-num">{{ c.createdAt | date: 'yyyy-MM-dd HH:mm:ss' }}</td>
        </ng-container>
        <ng-container matColumnDef="actions">
          <th mat-header-cell *matHeaderCellDef><span class="cdk-visually-hidden">Actions</span></th>
          <td mat-cell *matCellDef="let c">
            @if (canResume()) {
              <button mat-button type="button" (click)="resumeFrom.emit(c)" [attr.aria-label]="'Resume from step ' + c.step">
                <mat-icon>replay</mat-icon> Resume from here</button>
            }
            <a mat-button [routerLink]="['checkpoints', c.id, 'evaluation']" [attr.aria-label]="'Evaluate the checkpoint of step ' + c.step"><mat-icon>analytics</mat-icon> Evaluate</a>
            <button mat-button type="button" (click)="download.emit(c)" [attr.aria-label]="'Download the checkpoint of step ' + c.step">
              <mat-icon>download</mat-icon> Export</button>
          </td>
        </ng-container>
        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns"></tr>
      </table>
      @if (checkpoints().length === 0) { <div class="nw-empty">No checkpoints yet: they are saved every few steps and when training stops.</div> }
    </div>
  `,
})
export class RunCheckpoints {
  readonly checkpoints = input.required<CheckpointDto[]>();
  readonly canResume = input(false);
  readonly resumeFrom = output<CheckpointDto>();
  readonly download = output<CheckpointDto>();
  protected reasonOf(c: CheckpointDto): string { return REASONS[c.reason]; }
  /** Rows are kept when the list is reloaded after a save: only the new checkpoint's row is rendered. */
  protected readonly byId = (_: number, c: CheckpointDto): string => c.id;
  protected readonly columns = ['step', 'bound', 'reason', 'size', 'createdAt', 'actions'];
}
