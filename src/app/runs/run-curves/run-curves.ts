import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, afterNextRender, inject, input, viewChild } from '@angular/core';
import { LineChart } from 'echarts/charts';
import { GridComponent, LegendComponent, TooltipComponent } from 'echarts/components';
import * as echarts from 'echarts/core';
import { CanvasRenderer } from 'echarts/renderers';
import type { Observable, Subscription } from 'rxjs';
import type { CurvePoint } from '../live-run';
import { SERIES } from '../live-run';

echarts.use([LineChart, GridComponent, LegendComponent, TooltipComponent, CanvasRenderer]);

const RENDER_EVERY_MS = 2000;

/** Our palette (the product look): deep teal, amber for live activity, and two calm companions. */
const LINES = [
  { key: SERIES.train, name: 'Training bound', axis: 0, color: '#0f5e5a' },
  { key: SERIES.validation, name: 'Validation bound', axis: 0, color: '#c7861a' },
  { key: SERIES.entropy, name: 'Observation entropy', axis: 1, color: '#6b5b95' },
  { key: SERIES.noise, name: 'Mean noise MI', axis: 1, color: '#8a9a5b' },
] as const;

/**
 * Live curves of a run: history from the server, then points from the worker appended with `setOption`
 * (only the series data change; Angular does not re-render anything for a new point).
 */
@Component({
  selector: 'nw-run-curves',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `<div #host class="chart" role="img" aria-label="Training curves: bounds and noise figures by step"></div>`,
  styles: `.chart { width: 100%; height: 320px; }`,
})
export class RunCurves {
  /** Points already stored on the server, by series. */
  readonly history = input<Record<string, { steps: number[]; values: number[] }>>({});
  /** New points while the run trains in this tab. */
  readonly live = input<Observable<CurvePoint[]> | null>(null);
  private readonly host = viewChild.required<ElementRef<HTMLDivElement>>('host');
  private chart: echarts.ECharts | null = null;
  private readonly data = new Map<string, [number, number][]>(LINES.map((l) => [l.key, []]));
  private subscription: Subscription | null = null;
  private renderTimer: ReturnType<typeof setTimeout> | null = null;
  private lastRender = 0;

  constructor() {
    const destroyRef = inject(DestroyRef);
    afterNextRender(() => {
      this.chart = echarts.init(this.host().nativeElement, null, { renderer: 'canvas' });
      this.chart.setOption({
        animation: false,
        grid: { left: 56, right: 56, top: 40, bottom: 36 },
        legend: { top: 0, textStyle: { fontFamily: 'IBM Plex Sans' } },
        tooltip: { trigger: 'axis', valueFormatter: (v: unknown) => (typeof v === 'number' ? v.toFixed(3) : String(v)) },
        xAxis: { type: 'value', name: 'step', nameLocation: 'middle', nameGap: 24, min: 0 },
        yAxis: [
          { type: 'value', name: 'bits/char', scale: true },
          { type: 'value', name: 'bits', scale: true, splitLine: { show: false } },
        ],
        series: LINES.map((l) => ({
          id: l.key, name: l.name, type: 'line', yAxisIndex: l.axis, showSymbol: l.key !== SERIES.train,
          sampling: l.key === SERIES.train ? 'lttb' : undefined,
          symbolSize: 5, lineStyle: { width: 2 }, color: l.color, data: [],
        })),
      });
      this.reset(this.history());
      this.subscription = this.live()?.subscribe((points) => this.append(points)) ?? null;
      const resize = () => this.chart?.resize();
      window.addEventListener('resize', resize);
      destroyRef.onDestroy(() => {
        window.removeEventListener('resize', resize);
        this.subscription?.unsubscribe();
        if (this.renderTimer !== null) clearTimeout(this.renderTimer);
        this.chart?.dispose();
      });
    });
  }

  /** Replaces everything with the stored history (after loading, or after resuming from a checkpoint). */
  reset(history: Record<string, { steps: number[]; values: number[] }>): void {
    for (const l of LINES) {
      const h = history[l.key];
      this.data.set(l.key, h ? h.steps.map((s, i) => [s, h.values[i] as number]) : []);
    }
    this.render();
  }

  /** Follows a new live stream (e.g. after this tab started training the run). */
  follow(stream: Observable<CurvePoint[]> | null): void {
    this.subscription?.unsubscribe();
    this.subscription = stream?.subscribe((points) => this.append(points)) ?? null;
  }

  private append(points: CurvePoint[]): void {
    for (const p of points) {
      const list = this.data.get(p.series);
      if (!list) continue;
      while (list.length > 0 && (list.at(-1) as [number, number])[0] >= p.step) list.pop();
      list.push([p.step, p.value]);
    }
    this.scheduleRender();
  }

  /** Redraws at most every two seconds while points stream in (each redraw is one short main-thread task). */
  private scheduleRender(): void {
    if (this.renderTimer !== null) return;
    const wait = Math.max(0, RENDER_EVERY_MS - (performance.now() - this.lastRender));
    this.renderTimer = setTimeout(() => {
      this.renderTimer = null;
      this.render();
    }, wait);
  }

  private render(): void {
    this.lastRender = performance.now();
    this.chart?.setOption({ series: LINES.map((l) => ({ id: l.key, data: this.data.get(l.key) })) }, { lazyUpdate: true });
    // Point counts per series on the host element (read by the end-to-end test; no Angular re-render).
    const host = this.host().nativeElement;
    host.dataset['points'] = String([...this.data.values()].reduce((n, list) => n + list.length, 0));
    host.dataset['lastStep'] = String(this.data.get(SERIES.train)?.at(-1)?.[0] ?? 0);
  }
}
