import { ChangeDetectionStrategy, Component, computed, effect, inject, input, model, signal, untracked } from '@angular/core';
import { MatRadioModule } from '@angular/material/radio';
import type { RunnerAvailability, RunPlacement } from '../../../../shared/api/runners';
import { messageOf } from '../../core/api-error';
import { RunnersApi } from '../runners-api';

/**
 * "Train in this tab" or "Send to runners" for the run, grid and learnability forms. Asks the bench's runner
 * status once; with `preferRunners` (grids, learnability checks) it picks the runners when any is online, unless the
 * person chose already. Without the right to send (viewers) or without an online runner, the choice stays on the tab
 * and a line says why.
 */
@Component({
  selector: 'nw-placement-choice',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatRadioModule],
  template: `
    <div class="placement" data-testid="placement-choice">
      @if (availability(); as a) {
        @if (a.canSend) {
          <mat-radio-group [value]="placement()" (change)="choose($event.value)" [attr.aria-label]="task() === 'evaluate' ? 'Where the evaluation runs' : 'Where the training runs'">
            <mat-radio-button value="tab">{{ task() === 'evaluate' ? 'Evaluate in this tab' : 'Train in this tab' }}</mat-radio-button>
            <mat-radio-button value="runners" [disabled]="a.onlineRunners === 0">Send to runners</mat-radio-button>
          </mat-radio-group>
          <p class="line" data-testid="placement-explanation">{{ explanation() }}</p>
        } @else {
          <p class="line" data-testid="placement-explanation">{{ subject() }} in this tab: only members, coaches and owners of the bench can send {{ task() === 'evaluate' ? 'evaluations' : 'runs' }} to the runners.</p>
        }
      } @else if (problem(); as m) {
        <p class="line" data-testid="placement-explanation">{{ subject() }} in this tab: the runners' status could not be read ({{ m }})</p>
      }
    </div>
  `,
  styles: `
    .placement { display: flex; flex-direction: column; gap: 4px; margin: 8px 0; }
    mat-radio-group { display: flex; flex-wrap: wrap; gap: 8px 24px; }
    .line { margin: 0; color: var(--mat-sys-on-surface-variant); font-size: 0.875rem; }
  `,
})
export class PlacementChoice {
  readonly benchId = input.required<string>();
  /** Grids and learnability checks: choose the runners by default when any runner is online. */
  readonly preferRunners = input(false);
  /** Wording for several runs (grids, checks) or one. */
  readonly plural = input(false);
  readonly placement = model<RunPlacement>('tab');
  /** What is placed: training (run, grid and check forms) or an evaluation (the evaluation page). */
  readonly task = input<'train' | 'evaluate'>('train');
  protected readonly subject = computed(() => (this.task() === 'evaluate' ? 'The evaluation runs' : this.plural() ? 'The runs train' : 'The run trains'));
  private readonly api = inject(RunnersApi);
  protected readonly availability = signal<RunnerAvailability | null>(null);
  protected readonly problem = signal<string | null>(null);
  private touched = false;

  protected readonly explanation = computed(() => {
    const a = this.availability();
    if (!a) return '';
    const what = this.plural() ? 'the runs' : 'the run';
    if (this.task() === 'evaluate') return this.evaluationExplanation(a);
    if (a.onlineRunners === 0) {
      return `No runner is online now, so ${what} can only train in this tab (a worker of this page; closing the page pauses training). The instance admin starts runners from the Runners page.`;
    }
    if (this.placement() === 'runners') {
      const threads = `${a.onlineThreads} runner thread${a.onlineThreads === 1 ? '' : 's'} online`;
      const queue = a.waiting > 0 ? `, ${a.waiting} run${a.waiting === 1 ? '' : 's'} of this bench waiting` : '';
      return `The server's runners train ${what} (${threads}${queue}); you can close this page and follow progress from any tab.`;
    }
    return `A worker of this tab trains ${what}; closing or reloading the page pauses training until the page is open again.`;
  });

  private evaluationExplanation(a: RunnerAvailability): string {
    if (a.onlineRunners === 0) return 'No runner is online now, so the evaluation can only run in this tab (a worker of this page; leaving the page cancels it).';
    if (this.placement() === 'runners') {
      return `A runner computes the figures (${a.onlineThreads} runner thread${a.onlineThreads === 1 ? '' : 's'} online) and stores them; you can leave this page and come back for them.`;
    }
    return 'A worker of this tab computes the figures; leaving or reloading the page cancels the evaluation.';
  }

  constructor() {
    effect(() => {
      const benchId = this.benchId();
      untracked(() => void this.load(benchId));
    });
  }

  protected choose(value: RunPlacement): void {
    this.touched = true;
    this.placement.set(value);
  }

  private async load(benchId: string): Promise<void> {
    try {
      const a = await this.api.availability(benchId);
      this.availability.set(a);
      this.problem.set(null);
      const allowed = a.canSend && a.onlineRunners > 0;
      if (!allowed) this.placement.set('tab');
      else if (!this.touched && this.preferRunners()) this.placement.set('runners');
    } catch (error) {
      this.availability.set(null);
      this.placement.set('tab');
      this.problem.set(messageOf(error));
    }
  }
}
