/**
 * The only echarts parts the corpus charts use, registered on echarts/core so the bundle stays small,
 * and the chart colours of our theme (teal and amber on warm paper, see src/styles.scss).
 */
import { provideEchartsCore } from 'ngx-echarts';
import { BarChart } from 'echarts/charts';
import { GridComponent, LegendComponent, TooltipComponent } from 'echarts/components';
import * as echarts from 'echarts/core';
import { CanvasRenderer } from 'echarts/renderers';

echarts.use([BarChart, GridComponent, LegendComponent, TooltipComponent, CanvasRenderer]);

export const provideCorpusCharts = () => provideEchartsCore({ echarts });

export const CHART_COLOURS = {
  teal: '#1f6964',
  amber: '#c7861a',
  ink: '#2f2b24',
  muted: '#6b655a',
  rule: '#e6dfd0',
  paper: '#fffdf8',
} as const;

export const CHART_FONT = "'IBM Plex Sans', system-ui, sans-serif";
export const CHART_MONO = "'IBM Plex Mono', ui-monospace, monospace";
