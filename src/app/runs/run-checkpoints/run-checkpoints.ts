import { DatePipe, DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { BITS_PER_CHAR } from '../../../../shared/api/figure-names';
import type { CheckpointDto } from '../../../../shared/api/runs';

const REASONS: Record<CheckpointDto['reason'], string> = { auto: 'autosave', stop: 'on stop', manual: 'saved by hand', import: 'imported' };

/** The checkpoints of a run (newest first) with resume and download actions. */
@Component({
  selector: 'nw-run-checkpoints',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, DecimalPipe, MatButtonModule, MatIconModule, RouterLink],
  // A plain table (not mat-table): it is updated while a run trains, and a new row must cost the page's main
  // thread as little as possible (mat-table re-renders and re-measures its rows on every data change).
  template: `
    <div class="nw-table-wrap" data-testid="checkpoints">
      <table class="ck-table" aria-label="Checkpoints of the run">
        <thead>
          <tr>
            <th scope="col" class="nw-num">Step</th>
            <th scope="col" class="nw-num" data-testid="checkpoint-figure-head">{{ family() === 'ssm' ? 'Bound' : 'Cross entropy (exact)' }}</th>
            <th scope="col">Why</th>
            <th scope="col" class="nw-num">Size</th>
            <th scope="col" class="nw-num">Saved</th>
            <th scope="col"><span class="cdk-visually-hidden">Actions</span></th>
          </tr>
        </thead>
        <tbody>
          @for (c of checkpoints(); track c.id) {
            <tr>
              <td class="nw-num">{{ c.step | number }}</td>
              <td class="nw-num">
                @if (c.boundBitsPerChar !== null) { {{ c.boundBitsPerChar | number: '1.3-3' }}<span class="nw-unit">{{ bitsPerChar }}</span> } @else { — }
              </td>
              <td>{{ reasonOf(c) }}</td>
              <td class="nw-num">{{ c.byteSize / 1024 | number: '1.0-0' }}<span class="nw-unit">KiB</span></td>
              <td class="nw-num">{{ c.createdAt | date: 'yyyy-MM-dd HH:mm:ss' }}</td>
              <td class="actions">
                @if (canResume()) {
                  <button mat-button type="button" (click)="resumeFrom.emit(c)" [attr.aria-label]="'Resume from step ' + c.step">
                    <mat-icon>replay</mat-icon> Resume from here</button>
                }
                <a mat-button [routerLink]="['checkpoints', c.id, 'evaluation']" [attr.aria-label]="'Evaluate the checkpoint of step ' + c.step"><mat-icon>analytics</mat-icon> Evaluate</a>
                <button mat-button type="button" (click)="download.emit(c)" [attr.aria-label]="'Download the checkpoint of step ' + c.step">
                  <mat-icon>download</mat-icon> Export</button>
              </td>
            </tr>
          }
        </tbody>
      </table>
      @if (checkpoints().length === 0) { <div class="nw-empty">No checkpoints yet: they are saved every few steps and when training stops.</div> }
    </div>
  `,
  styles: `
    .ck-table { width: 100%; border-collapse: collapse; background: var(--mat-sys-surface-container-lowest); font: var(--mat-sys-body-medium); }
    th { font: var(--mat-sys-title-small); height: 56px; text-align: left; }
    th, td { padding: 0 16px; border-bottom: 1px solid var(--mat-sys-outline-variant); }
    td { height: 52px; }
    tbody tr:last-child td { border-bottom: none; }
    th.nw-num, td.nw-num { text-align: right; }
    .actions { white-space: nowrap; }
  `,
})
export class RunCheckpoints {
  readonly checkpoints = input.required<CheckpointDto[]>();
  /** The run's family: the SSM's figure is a bound, the GRU's and n-gram's exact. */
  readonly family = input<'ssm' | 'gru' | 'ngram'>('ssm');
  readonly canResume = input(false);
  protected readonly bitsPerChar = BITS_PER_CHAR;
  readonly resumeFrom = output<CheckpointDto>();
  readonly download = output<CheckpointDto>();
  protected reasonOf(c: CheckpointDto): string { return REASONS[c.reason]; }
}
