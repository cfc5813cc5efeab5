import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { BITS_PER_CHAR, figureKind } from '../../../../shared/api/figure-names';
import type { LearnabilityVerdict } from '../../../../shared/api/grids';
import { STATUS_LABELS } from '../../runs/run-labels';

/** The verdict of a learnability check: bits/char of every model, its gap to the best n-gram, and "on par" per state size. */
@Component({
  selector: 'nw-learnability-verdict',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DecimalPipe],
  template: `
    <div class="nw-card">
      <p class="lead">
        @if (verdict().ngramFloor; as f) {
          Best n-gram: order {{ f.order }} reaches <span class="nw-num" data-testid="best-ngram">{{ f.bitsPerChar | number: '1.3-3' }}</span><span class="nw-unit">{{ bitsPerChar }}, exact</span>
          (a reference to beat, not a limit: a model with a state can go below it).
        } @else { The best n-gram is known once the n-gram runs have finished. }
        Every model trained for {{ verdict().budgetSteps | number }} steps. @if (!verdict().complete) { <strong>Still training: figures fill in as runs end.</strong> }
      </p>
      <div class="tables">
        <table aria-label="Bits per character of every model" data-testid="verdict-models">
          <thead><tr><th>Model</th><th>Status</th><th>Figure</th><th class="nw-num">Held-out</th><th class="nw-num">Per word</th><th class="nw-num">Gap to best n-gram</th></tr></thead>
          <tbody>
            @for (r of verdict().rows; track r.model) {
              <tr>
                <td>{{ r.model }}</td>
                <td>{{ r.status ? statusLabels[r.status] : '(deleted)' }}</td>
                <td data-testid="verdict-kind">{{ figureKind(r.family) }}</td>
                <td class="nw-num">@if (r.bitsPerChar !== null) { {{ r.bitsPerChar | number: '1.3-3' }}<span class="nw-unit">bits/char</span> } @else { — }</td>
                <td class="nw-num">@if (r.bitsPerWord != null) { {{ r.bitsPerWord | number: '1.2-2' }}<span class="nw-unit">bits/word</span> } @else { — }</td>
                <td class="nw-num">@if (r.gapToNgramFloor !== null) { {{ r.gapToNgramFloor >= 0 ? '+' : '' }}{{ r.gapToNgramFloor | number: '1.3-3' }}<span class="nw-unit">bits/char</span> } @else { — }</td>
              </tr>
            }
          </tbody>
        </table>
        <table aria-label="State-space model against the GRU at each state size" data-testid="verdict-on-par">
          <thead><tr><th class="nw-num">State size</th><th class="nw-num">GRU</th><th class="nw-num">State-space</th><th class="nw-num">Difference</th><th>On par?</th></tr></thead>
          <tbody>
            @for (c of verdict().comparisons; track c.stateSize) {
              <tr>
                <td class="nw-num">{{ c.stateSize }}</td>
                <td class="nw-num">@if (c.gruBitsPerChar !== null) { {{ c.gruBitsPerChar | number: '1.3-3' }} } @else { — }</td>
                <td class="nw-num">@if (c.ssmBitsPerChar !== null) { {{ c.ssmBitsPerChar | number: '1.3-3' }} } @else { — }</td>
                <td class="nw-num">@if (c.difference !== null) { {{ c.difference >= 0 ? '+' : '' }}{{ c.difference | number: '1.3-3' }}<span class="nw-unit">bits/char</span> } @else { — }</td>
                <td [class.yes]="c.onPar === true" [class.no]="c.onPar === false">{{ c.onPar === null ? 'not yet known' : c.onPar ? 'yes' : 'no' }}</td>
              </tr>
            }
          </tbody>
        </table>
      </div>
      <p class="caption" data-testid="verdict-caption">Held-out costs on the validation words at each run's best validation step:
        bits per character count the end of each word as one more character (bits/char, end-of-word counted), bits per word stand
        beside them. Lower is better; exact for the n-gram and the GRU, an upper bound from the importance-weighted bound for the
        state-space model. The best n-gram is a reference point, not a floor: a negative gap means the model beats it. “On par” means the state-space model is at most {{ verdict().toleranceBits }} bits/char
        above the teacher-forced GRU of the same state size. A short fixed budget favours fast learners: read a “no” as “not at this budget”.</p>
    </div>
  `,
  styles: `
    .tables { display: grid; grid-template-columns: 1fr; gap: 20px; align-items: start; }
    td:first-child { white-space: nowrap; }
    table { width: 100%; border-collapse: collapse; }
    th, td { padding: 6px 10px; border-bottom: 1px solid var(--mat-sys-outline-variant); text-align: left; }
    th.nw-num, td.nw-num { text-align: right; }
    td.yes { color: var(--mat-sys-primary); font-weight: 600; }
    td.no { color: #8a4b00; font-weight: 600; }
    .caption { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-small); margin: 12px 0 0; }
  `,
})
export class LearnabilityVerdictTable {
  readonly verdict = input.required<LearnabilityVerdict>();
  protected readonly statusLabels = STATUS_LABELS;
  protected readonly bitsPerChar = BITS_PER_CHAR;
  protected readonly figureKind = figureKind;
}
