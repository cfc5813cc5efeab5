import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { unitText } from '../../../../shared/api/figure-names';
import { GRID_FIGURE_LABELS, type GridFigure } from '../../../../shared/api/grids';
import { HEAT_RAMP, provideComparisonCharts } from '../../compare/comparison-charts';
import { CHART_COLOURS as C, CHART_FONT, CHART_MONO } from '../../corpora/corpus-charts/chart-setup';
import type { HeatmapData } from './heatmap-data';

const format = (v: number, unit: string) => (unit === 'bits/char' ? v.toFixed(3) : Math.abs(v) >= 100 ? Math.round(v).toLocaleString('en-US') : v.toFixed(1));

/** The heat map of a grid: one square per pair of axis values, deep teal for the best figure, paper for the worst. */
@Component({
  selector: 'nw-grid-heatmap',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [NgxEchartsDirective],
  providers: [provideComparisonCharts()],
  template: `<div echarts class="chart" [options]="options()" role="img" [style.height.px]="height()"
                  [attr.aria-label]="'Heat map of ' + label() + ' over ' + data().columnTitle + (data().rowTitle ? ' and ' + data().rowTitle : '')"
                  data-testid="heatmap" [attr.data-filled]="data().cells.length"></div>`,
  styles: `.chart { width: 100%; } @media print { .chart { width: 17cm !important; } }`,
})
export class GridHeatmap {
  readonly data = input.required<HeatmapData>();
  readonly figure = input.required<GridFigure>();
  protected readonly label = computed(() => GRID_FIGURE_LABELS[this.figure()].label);
  protected readonly height = computed(() => Math.max(220, 90 + this.data().rows.length * 64));
  protected readonly options = computed<EChartsCoreOption>(() => {
    const d = this.data();
    const shortUnit = GRID_FIGURE_LABELS[this.figure()].unit;
    const unit = unitText(shortUnit);
    const scores = d.cells.map((c) => c.goodness);
    const lo = scores.length ? Math.min(...scores) : 0;
    const hi = scores.length ? Math.max(...scores) : 1;
    return {
      animation: false,
      backgroundColor: 'transparent',
      textStyle: { fontFamily: CHART_FONT, color: C.ink },
      tooltip: {
        formatter: ({ data: { value: v } }: { data: { value: number[] } }) =>
          `${d.columnTitle} ${d.columns[v[0]!]}${d.rowTitle ? `, ${d.rowTitle} ${d.rows[v[1]!]}` : ''}<br/>` +
          `${format(v[2]!, shortUnit)}${v[6]! >= 0 ? ` ± ${format(v[6]!, shortUnit)}` : ''} ${unit}${v[5]! > 1 ? ` (mean of ${v[4]} of ${v[5]} runs${v[6]! >= 0 ? ', ± standard error over the runs' : ''})` : ''}`,
      },
      grid: { left: 110, right: 24, top: 16, bottom: 56 },
      xAxis: { type: 'category', data: d.columns, name: d.columnTitle, nameLocation: 'middle', nameGap: 32, splitArea: { show: true },
        axisLabel: { color: C.ink, fontFamily: CHART_MONO } },
      yAxis: { type: 'category', inverse: true, data: d.rows, name: d.rowTitle, nameLocation: 'middle', nameGap: 90, splitArea: { show: true },
        axisLabel: { color: C.ink, fontFamily: CHART_MONO } },
      visualMap: { show: false, dimension: 3, min: lo, max: hi === lo ? lo + 1 : hi, inRange: { color: [...HEAT_RAMP] } },
      series: [{
        type: 'heatmap',
        // Dark squares (the better half of the ramp) get paper-coloured figures, pale ones ink.
        data: d.cells.map((c) => ({
          value: [c.x, c.y, c.value, c.goodness, c.runs, c.of, c.se ?? -1],
          label: { color: hi > lo && (c.goodness - lo) / (hi - lo) > 0.6 ? C.paper : C.ink },
        })),
        label: { show: true, fontFamily: CHART_MONO, fontSize: 13, formatter: (p: { data: { value: number[] } }) => format(p.data.value[2]!, shortUnit) },
        itemStyle: { borderColor: C.paper, borderWidth: 2 },
      }],
    };
  });
}
