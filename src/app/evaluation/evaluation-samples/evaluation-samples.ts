import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { SsmEvaluation } from '../../../../shared/eval/evaluation-report';

const SOURCE_LABELS = { train: 'training word', 'held-out': 'held-out word', novel: 'new' } as const;

/** Where the samples come from (training / held-out / novel, with counts) and the most frequent samples. */
@Component({
  selector: 'nw-evaluation-samples',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DecimalPipe],
  template: `
    <table class="shares" aria-label="Where the samples come from" data-testid="sample-shares">
      <thead><tr><th scope="col">Samples that are</th><th scope="col" class="nw-num">Count</th><th scope="col" class="nw-num">Share</th></tr></thead>
      <tbody>
        @for (row of shares(); track row.label) {
          <tr><th scope="row">{{ row.label }}</th><td class="nw-num">{{ row.count | number }}</td>
            <td class="nw-num">{{ row.share * 100 | number: '1.1-1' }}<span class="nw-unit">%</span></td></tr>
        }
      </tbody>
    </table>
    <h3>Most frequent samples</h3>
    <table class="top" aria-label="Most frequent samples" data-testid="sample-top">
      <thead><tr><th scope="col">Word</th><th scope="col" class="nw-num">Times</th><th scope="col">Is a</th></tr></thead>
      <tbody>
        @for (s of result().samples.top; track s.word) {
          <tr><td class="nw-mono">{{ s.word || '(empty)' }}</td><td class="nw-num">{{ s.count | number }}</td><td>{{ sourceLabels[s.source] }}</td></tr>
        }
      </tbody>
    </table>
    <p class="nw-muted note">
      @if (result().samples.truncated > 0) { {{ result().samples.truncated | number }} samples reached the length limit before the end symbol. }
      Generated words can coincide with real names, brands or trademarks; check before using them.</p>
  `,
  styles: `
    table { border-collapse: collapse; width: 100%; }
    th, td { text-align: left; font-weight: normal; padding: 4px 8px 4px 0; }
    thead th { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-label-medium); }
    th.nw-num, td.nw-num { text-align: right; }
    tbody tr { border-top: 1px solid var(--mat-sys-outline-variant); }
    h3 { font: var(--mat-sys-title-small); margin: 16px 0 4px; }
    .top { max-width: 520px; }
    .note { font: var(--mat-sys-body-small); margin: 8px 0 0; }
  `,
})
export class EvaluationSamples {
  readonly result = input.required<SsmEvaluation>();
  protected readonly sourceLabels = SOURCE_LABELS;
  protected readonly shares = computed(() => {
    const s = this.result().samples;
    const rows = [
      { label: 'training words', share: s.shares.train },
      { label: 'held-out words', share: s.shares.heldOut },
      { label: 'new words', share: s.shares.novel },
    ];
    return rows.map((r) => ({ ...r, count: Math.round(r.share * s.count) }));
  });
}
