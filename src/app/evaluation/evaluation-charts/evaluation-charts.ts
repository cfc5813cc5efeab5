import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { SsmEvaluation } from '../../../../shared/eval/evaluation-report';
import { provideEvaluationCharts } from './evaluation-chart-setup';
import { entropyBarOptions, noiseBoxOptions, sampleLengthOptions } from './evaluation-chart-options';

/** Noise use per position (box plots), observation entropy beside the baseline, and sample lengths. */
@Component({
  selector: 'nw-evaluation-charts',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [NgxEchartsDirective],
  providers: [provideEvaluationCharts()],
  template: `
    <div class="charts">
      <figure class="nw-card chart-card wide">
        <h2>Noise use by position</h2>
        <div echarts class="chart" [options]="boxes()" data-testid="chart-noise-mi" role="img"
             aria-label="Box plots of the noise mutual information at each position"></div>
        <figcaption>Each box is the mutual information I_t between the fresh noise and the character at position t, across
          {{ result().noise.perWord.length }} held-out words (box: middle half, line: median, whiskers: extremes; M = {{ result().noise.draws }} draws);
          higher boxes mean the model puts more of the word's choices into the noise at that position, at most
          {{ result().noise.maxBits.toFixed(2) }} bits (log V).</figcaption>
      </figure>
      <figure class="nw-card chart-card">
        <h2>Observation entropy</h2>
        <div echarts class="chart short" [options]="entropy()" data-testid="chart-entropy" role="img"
             aria-label="Bar chart of the observation entropy beside the baseline"></div>
        <figcaption>Mean entropy of the next-character distribution along posterior paths (teal) beside the GRU
          baseline's predictive entropy on the same words (amber, when chosen); a non-autoregressive model should stay low,
          because randomness spent in the emission is forgotten by the next state.</figcaption>
      </figure>
      <figure class="nw-card chart-card">
        <h2>Sample lengths</h2>
        <div echarts class="chart short" [options]="lengths()" data-testid="chart-sample-lengths" role="img"
             aria-label="Bar chart of sample lengths beside corpus lengths"></div>
        <figcaption>Share of the {{ result().samples.count }} samples (teal) and of corpus tokens (amber) at each length;
          bars of equal height mean the model has learnt how long the corpus's words are.</figcaption>
      </figure>
    </div>
  `,
  styles: `
    .charts { display: grid; grid-template-columns: repeat(auto-fit, minmax(380px, 1fr)); gap: 20px; }
    .chart-card { margin: 0; break-inside: avoid; }
    .wide { grid-column: 1 / -1; }
    .chart { height: 300px; width: 100%; }
    .chart.short { height: 240px; }
    figcaption { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-small); margin-top: 8px; }
  `,
})
export class EvaluationCharts {
  readonly result = input.required<SsmEvaluation>();
  protected readonly boxes = computed(() => noiseBoxOptions(this.result()));
  protected readonly entropy = computed(() => entropyBarOptions(this.result()));
  protected readonly lengths = computed(() => sampleLengthOptions(this.result()));
}
