import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { CHART_COLOURS as C, CHART_FONT, CHART_MONO } from '../../corpora/corpus-charts/chart-setup';
import { provideComparisonCharts, RUN_COLOURS } from '../comparison-charts';

export interface RunCurve { name: string; steps: number[]; values: number[] }

/** One metric series of several runs drawn over each other (one line per run, same colours as the table order). */
@Component({
  selector: 'nw-compare-curves',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [NgxEchartsDirective],
  providers: [provideComparisonCharts()],
  template: `<div echarts class="chart" [options]="options()" role="img" [attr.aria-label]="'Curves of ' + label() + ' by step, one line per run'"
                  [attr.data-lines]="curves().length"></div>`,
  styles: `.chart { width: 100%; height: 300px; } @media print { .chart { width: 17cm; height: 8cm; } }`,
})
export class CompareCurves {
  readonly curves = input.required<RunCurve[]>();
  readonly label = input.required<string>();
  readonly unit = input('bits/char');
  protected readonly options = computed<EChartsCoreOption>(() => ({
    animation: false,
    backgroundColor: 'transparent',
    textStyle: { fontFamily: CHART_FONT, color: C.ink },
    legend: { top: 0, type: 'scroll', textStyle: { color: C.ink } },
    grid: { left: 56, right: 24, top: 40, bottom: 40 },
    tooltip: { trigger: 'axis', valueFormatter: (v: unknown) => (typeof v === 'number' ? v.toFixed(3) : String(v)) },
    xAxis: { type: 'value', name: 'step', nameLocation: 'middle', nameGap: 26, min: 0,
      axisLabel: { color: C.muted, fontFamily: CHART_MONO }, splitLine: { lineStyle: { color: C.rule } } },
    yAxis: { type: 'value', name: this.unit(), scale: true, axisLabel: { color: C.muted, fontFamily: CHART_MONO },
      splitLine: { lineStyle: { color: C.rule } } },
    series: this.curves().map((c, i) => ({
      name: c.name, type: 'line', showSymbol: c.steps.length < 40, symbolSize: 4, sampling: 'lttb',
      lineStyle: { width: 2 }, color: RUN_COLOURS[i % RUN_COLOURS.length],
      data: c.steps.map((s, j) => [s, c.values[j]]),
    })),
  }));
}
