import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { LiveCompletion } from '../../workers/evaluator-api';
import { EvaluationWorker } from '../evaluation-worker';

/** Type a prefix, see the weighted continuations (particle filter over the prefix, then prior sampling). */
@Component({
  selector: 'nw-completion-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DecimalPipe, FormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule],
  template: `
    <form class="row" (ngSubmit)="run()">
      <mat-form-field>
        <mat-label>Prefix</mat-label>
        <input matInput name="prefix" [ngModel]="prefix()" (ngModelChange)="prefix.set($event)" autocomplete="off" data-testid="completion-prefix" />
        <mat-hint>empty = whole words</mat-hint>
      </mat-form-field>
      <button mat-stroked-button type="submit" [disabled]="busy()" data-testid="complete"><mat-icon>keyboard_tab</mat-icon> Complete</button>
    </form>
    @if (busy()) { <mat-progress-bar mode="indeterminate" aria-label="Completing" /> }
    @if (problem(); as message) { <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div> }
    @if (result(); as c) {
      <p class="nw-muted meta">−log₂ p(prefix) ≈ <span class="nw-num">{{ -c.logPrefix / ln2 | number: '1.2-2' }}</span><span class="nw-unit">bits</span> ·
        effective particles <span class="nw-num">{{ c.effectiveSampleSize | number: '1.0-0' }}</span> of {{ particles }}</p>
      <table aria-label="Weighted continuations" data-testid="completions">
        <thead><tr><th scope="col">Word</th><th scope="col" class="nw-num">Weight</th><th scope="col">Ends</th></tr></thead>
        <tbody>
          @for (x of c.continuations.slice(0, 15); track x.word) {
            <tr>
              <td class="nw-mono"><span class="given">{{ c.prefix }}</span>{{ x.continuation }}</td>
              <td class="nw-num"><span class="bar" [style.width.px]="x.weight * 120"></span>{{ x.weight * 100 | number: '1.1-1' }}<span class="nw-unit">%</span></td>
              <td>{{ x.ended ? 'yes' : 'cut at length limit' }}</td>
            </tr>
          }
        </tbody>
      </table>
    }
    <p class="nw-muted caption">Continuations of the prefix, heaviest first: the weight is the share of {{ particles }} filtered particles that
      produced the word, so it estimates p(word | prefix); the prefix is shown faded. Generated words can coincide with real names or trademarks.</p>
  `,
  styles: `
    .row { display: flex; gap: 12px; align-items: baseline; flex-wrap: wrap; }
    table { border-collapse: collapse; width: 100%; max-width: 560px; }
    th, td { text-align: left; font-weight: normal; padding: 4px 8px 4px 0; }
    thead th { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-label-medium); }
    th.nw-num, td.nw-num { text-align: right; }
    tbody tr { border-top: 1px solid var(--mat-sys-outline-variant); }
    .given { color: var(--mat-sys-on-surface-variant); opacity: 0.7; }
    .meta { margin-top: 12px; }
    .bar { display: inline-block; height: 8px; background: var(--nw-live, #c7861a); opacity: 0.5; margin-right: 8px; vertical-align: middle; }
    .meta, .caption { font: var(--mat-sys-body-small); }
    .caption { margin-top: 16px; }
  `,
})
export class CompletionPanel {
  /** Loads the checkpoint into the worker (once). */
  readonly load = input.required<() => Promise<unknown>>();
  readonly seed = input(1);
  /** The model's characters (without the end symbol), to check a prefix before asking the worker. */
  readonly alphabet = input.required<string[]>();
  private readonly worker = inject(EvaluationWorker);
  protected readonly prefix = signal('');
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly result = signal<LiveCompletion | null>(null);
  protected readonly particles = 512;
  protected readonly ln2 = Math.LN2;

  protected async run(): Promise<void> {
    this.busy.set(true);
    this.problem.set(null);
    try {
      const prefix = this.prefix().trim();
      const unknown = [...new Set(Array.from(prefix).filter((c) => !this.alphabet().includes(c)))];
      if (unknown.length > 0) {
        throw new Error(`The model never saw ${unknown.map((c) => `“${c}”`).join(', ')}; use only these characters: ${this.alphabet().join(' ')}.`);
      }
      await this.load()();
      this.result.set(await this.worker.complete(prefix, { particles: this.particles, tMax: Math.max(24, Array.from(prefix).length + 12), seed: this.seed() }));
    } catch (e) {
      this.result.set(null);
      this.problem.set(e instanceof Error ? e.message : String(e));
    } finally {
      this.busy.set(false);
    }
  }
}
