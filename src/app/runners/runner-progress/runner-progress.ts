import { isExactFamily, trainingFigureName } from '../../../../shared/api/figure-names';
import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { RunControlAction, RunLiveProgress } from '../../../../shared/api/runners';
import type { RunDto } from '../../../../shared/api/runs';
import { STATUS_LABELS, formatDuration } from '../../runs/run-labels';
import type { StreamState } from '../run-events';

/**
 * Progress of a run trained by the server's runners, as its event stream reports it: runner, steps/s, step/steps,
 * time left, the training figure; pause / resume / stop for those who may control the run (not viewers).
 */
@Component({
  selector: 'nw-runner-progress',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DecimalPipe, MatButtonModule, MatIconModule, MatProgressBarModule],
  template: `
    <div class="nw-card progress-card" data-testid="runner-progress">
      <p class="where" data-testid="runner-where">
        @switch (run().status) {
          @case ('queued') {
            Waiting for a runner: the server's runners take queued runs in turn, fairly between benches.
            @if (run().statusReason; as why) { <span data-testid="runner-wait-reason">{{ why }}</span> }
          }
          @case ('training') { Training on <strong>{{ runnerName() ?? 'a runner' }}</strong>. Closing this page does not stop it. }
          @case ('paused') { Paused on the runners; its latest checkpoint is saved. }
          @default { {{ statusLabel() }} on the runners{{ runnerName() ? ' (last on ' + runnerName() + ')' : '' }}. }
        }
      </p>
      <div class="bar-line">
        <mat-progress-bar mode="determinate" [value]="percent()" aria-label="Training progress" />
        <span class="nw-num" data-testid="runner-steps">step {{ step() | number }} / {{ steps() | number }}</span>
      </div>
      <dl class="figures">
        <dt>Speed</dt>
        <dd class="nw-num" data-testid="runner-speed">@if (run().status === 'training' && progress()?.stepsPerSecond; as s) { {{ s | number: '1.1-1' }}<span class="nw-unit">steps/s</span> } @else { — }</dd>
        <dt>Time left</dt><dd class="nw-num" data-testid="runner-eta">{{ run().status === 'training' ? duration(progress()?.etaSeconds) : '—' }}</dd>
        <dt>{{ figureLabel() }}</dt>
        <dd class="nw-num" data-testid="runner-figure">@if (progress()?.bitsPerChar; as b) { {{ b | number: '1.3-3' }}<span class="nw-unit">bits/char, end-of-word symbol counted</span> } @else { — }</dd>
        <dt>Live updates</dt><dd data-testid="runner-connection">{{ connectionLabel() }}</dd>
      </dl>
      @if (canControl()) {
        <div class="nw-actions">
          @if (run().status === 'training') {
            <button mat-stroked-button type="button" [disabled]="busy()" (click)="control.emit('pause')"><mat-icon>pause</mat-icon> Pause</button>
          }
          @if (run().status === 'paused' || run().status === 'stopped') {
            <button mat-stroked-button type="button" [disabled]="busy()" (click)="control.emit('resume')"><mat-icon>play_arrow</mat-icon> Resume on the runners</button>
          }
          @if (run().status === 'queued' || run().status === 'training' || run().status === 'paused') {
            <button mat-stroked-button type="button" [disabled]="busy()" (click)="control.emit('stop')"><mat-icon>stop</mat-icon> Stop</button>
          }
        </div>
        @if (note(); as n) { <p class="small" role="status" data-testid="runner-note">{{ n }}</p> }
        <p class="nw-muted small">Pause and stop reach the runner within a few seconds; it saves a checkpoint first. Resume queues the run again from its latest checkpoint.</p>
      }
    </div>
  `,
  styles: `
    .where { margin: 0 0 8px; }
    .bar-line { display: flex; align-items: center; gap: 12px; }
    .bar-line mat-progress-bar { flex: 1; }
    .figures { display: grid; grid-template-columns: max-content 1fr; gap: 4px 16px; margin: 12px 0; }
    .figures dt { color: var(--mat-sys-on-surface-variant); }
    .figures dd { margin: 0; }
    .small { font-size: 0.85rem; margin: 4px 0 0; }
  `,
})
export class RunnerProgress {
  readonly run = input.required<RunDto>();
  readonly progress = input<RunLiveProgress | null>(null);
  readonly connection = input<StreamState>('connecting');
  readonly canControl = input(false);
  readonly busy = input(false);
  /** The server's sentence about the last control request. */
  readonly note = input<string | null>(null);
  readonly control = output<RunControlAction>();
  protected readonly duration = formatDuration;

  protected readonly runnerName = computed(() => this.progress()?.runnerName ?? this.run().runner?.name ?? null);
  protected readonly statusLabel = computed(() => STATUS_LABELS[this.run().status]);
  protected readonly step = computed(() => Math.max(this.progress()?.step ?? 0, this.run().stepsDone));
  protected readonly steps = computed(() => {
    const r = this.run();
    return this.progress()?.steps ?? (r.family === 'ngram' ? 1 : r.settings.training?.steps ?? 0);
  });
  protected readonly percent = computed(() => (this.steps() > 0 ? Math.min(100, (100 * this.step()) / this.steps()) : 0));
  protected readonly figureLabel = computed(() => {
    // A GRU's or n-gram's figure is exact, never a bound; an SSM's is named once its progress says which it is.
    const family = this.run().family;
    const b = this.progress()?.isBound;
    return isExactFamily(family) || typeof b === 'boolean' ? trainingFigureName(family, b ?? true) : 'Training figure';
  });
  protected readonly connectionLabel = computed(() => ({
    open: 'live (server-sent events)',
    connecting: 'connecting…',
    polling: 'the live stream is unavailable: asking the server every few seconds',
    closed: 'closed',
  })[this.connection()]);
}
