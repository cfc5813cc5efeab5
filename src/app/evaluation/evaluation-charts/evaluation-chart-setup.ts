/** The echarts parts the evaluation charts use (box plots and bars), registered on echarts/core. */
import { provideEchartsCore } from 'ngx-echarts';
import { BarChart, BoxplotChart } from 'echarts/charts';
import { GridComponent, LegendComponent, TooltipComponent } from 'echarts/components';
import * as echarts from 'echarts/core';
import { CanvasRenderer } from 'echarts/renderers';

echarts.use([BarChart, BoxplotChart, GridComponent, LegendComponent, TooltipComponent, CanvasRenderer]);

export const provideEvaluationCharts = () => provideEchartsCore({ echarts });
