/**
 * The echarts parts used by comparisons, grids and reports (lines and the heat map), registered on
 * echarts/core so the bundle stays small, and the line colours of our palette (teal first, amber second).
 */
import { HeatmapChart, LineChart } from 'echarts/charts';
import { GridComponent, LegendComponent, TooltipComponent, VisualMapComponent } from 'echarts/components';
import * as echarts from 'echarts/core';
import { CanvasRenderer } from 'echarts/renderers';
import { provideEchartsCore } from 'ngx-echarts';

echarts.use([LineChart, HeatmapChart, GridComponent, LegendComponent, TooltipComponent, VisualMapComponent, CanvasRenderer]);

export const provideComparisonCharts = () => provideEchartsCore({ echarts });

/** Lines of up to eight runs: teal, amber, then calm companions that stay apart in grey print. */
export const RUN_COLOURS = ['#1f6964', '#c7861a', '#6b5b95', '#8a9a5b', '#b5523b', '#3f7fa6', '#7a6a4f', '#2f2b24'] as const;

/** Heat-map ramp from warm paper (worse) to deep teal (better). */
export const HEAT_RAMP = ['#fbf3e2', '#e9c98a', '#8fb8a8', '#1f6964'] as const;
