import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { EvaluationResults } from '../../../../shared/api/evaluations';
import { figureRows } from './figure-rows';

/** The headline numbers of an evaluation: mono, right-aligned, with units and standard errors (per-word spread and repeats). */
@Component({
  selector: 'nw-evaluation-figures',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DecimalPipe],
  template: `
    <table class="figures" aria-label="Evaluation figures" data-testid="figures">
      <tbody>
        @for (row of rows(); track row.key) {
          <tr [attr.data-figure]="row.key">
            <th scope="row">{{ row.label }}</th>
            <td class="nw-num value">{{ row.value | number: '1.' + row.digits + '-' + row.digits }}</td>
            <td class="nw-num spread">@if (row.spread !== undefined) { ± {{ row.spread | number: '1.' + row.digits + '-' + row.digits }}@if (row.spreadKind === 'sd-repeats') { sd } }</td>
            <td class="unit nw-unit">{{ row.unit }}</td>
          </tr>
        }
      </tbody>
    </table>
    <p class="nw-muted note" data-testid="figures-note">Held-out figures are costs (minus log-likelihood): lower is better; bits per character count the
      end of each word as one more character. The state-space model's figures are bounds, the GRU's and the n-gram's exact.
      “±” is a standard error from the per-word spread and, for estimates, the spread between repeats@if (olderSpread()) {; marked “sd”, the
      standard deviation over repeats (this evaluation was stored before standard errors were kept)}.
      The sequence cross entropy is never below H(p_data) for an exact model; the KL gap is the difference.</p>
  `,
  styles: `
    .figures { border-collapse: collapse; width: 100%; }
    th { text-align: left; font-weight: normal; padding: 6px 12px 6px 0; }
    td { padding: 6px 0 6px 8px; }
    tr + tr { border-top: 1px solid var(--mat-sys-outline-variant); }
    .value { font-size: 1.05em; }
    .spread { color: var(--mat-sys-on-surface-variant); min-width: 80px; }
    .unit { width: 200px; }
    .note { font: var(--mat-sys-body-small); margin: 8px 0 0; }
  `,
})
export class EvaluationFigures {
  readonly result = input.required<EvaluationResults>();
  protected readonly rows = computed(() => figureRows(this.result()));
  protected readonly olderSpread = computed(() => this.rows().some((r) => r.spreadKind === 'sd-repeats'));
}
