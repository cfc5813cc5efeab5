import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { CorpusStats } from '../corpora-api';
import { provideCorpusCharts } from './chart-setup';
import { characterFrequencyOptions, lengthHistogramOptions, topWordsOptions } from './corpus-chart-options';

/** The three corpus charts, each with a caption that says what it shows and how to read it. */
@Component({
  selector: 'nw-corpus-charts',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [NgxEchartsDirective],
  providers: [provideCorpusCharts()],
  template: `
    <div class="charts">
      <figure class="nw-card chart-card">
        <h2>Word lengths</h2>
        <div echarts class="chart" [options]="lengths()" data-testid="chart-lengths" role="img"
             aria-label="Bar chart of the share of word types and tokens by length"></div>
        <figcaption>Share of distinct words (teal) and of all occurrences (amber) at each length in characters;
          amber above teal at a length means the words of that length are used more often than average.</figcaption>
      </figure>
      <figure class="nw-card chart-card">
        <h2>Character frequencies</h2>
        <div echarts class="chart" [options]="chars()" data-testid="chart-chars" role="img"
             aria-label="Bar chart of character shares"></div>
        <figcaption>Share of each character among all characters of all occurrences, most frequent first;
          a flat profile means a high letter entropy, a steep one a low letter entropy.</figcaption>
      </figure>
      <figure class="nw-card chart-card">
        <h2>Most frequent words</h2>
        <div echarts class="chart tall" [options]="top()" data-testid="chart-top" role="img"
             aria-label="Bar chart of the most frequent words"></div>
        <figcaption>Counts of the most frequent words, the most frequent at the top; a few very long bars mean a few
          words carry much of the corpus, which lowers the unigram entropy.</figcaption>
      </figure>
    </div>
  `,
  styles: `
    .charts { display: grid; grid-template-columns: repeat(auto-fit, minmax(340px, 1fr)); gap: 20px; }
    .chart-card { margin: 0; }
    .chart { height: 260px; width: 100%; }
    .chart.tall { height: 320px; }
    figcaption { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-small); margin-top: 8px; }
  `,
})
export class CorpusCharts {
  readonly stats = input.required<CorpusStats>();
  protected readonly lengths = computed(() => lengthHistogramOptions(this.stats()));
  protected readonly chars = computed(() => characterFrequencyOptions(this.stats()));
  protected readonly top = computed(() => topWordsOptions(this.stats()));
}
