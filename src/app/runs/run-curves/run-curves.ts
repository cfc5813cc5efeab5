import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, afterNextRender, inject, input, viewChild } from '@angular/core';
import type { Observable, Subscription } from 'rxjs';
import uPlot from 'uplot';
import type { CurvePoint } from '../live-run';
import { SERIES } from '../live-run';
import { alignSeries } from './align-series';
import { curveLines } from './curve-lines';

/** Steps are whole numbers: ticks every 1, 2, 5, 10, 20, 50, … steps (uPlot's default also offers 0.5, 0.25, …). */
const STEP_TICKS = Array.from({ length: 8 }, (_, k) => [1, 2, 5].map((m) => m * 10 ** k)).flat();
/** Live points are drawn at most this often; a redraw costs about a millisecond of main-thread time. */
const RENDER_EVERY_MS = 1000;
const HEIGHT = 300;

const AXIS_FONT = '12px "IBM Plex Sans", system-ui, sans-serif';
const fixed3 = (_: uPlot, v: number | null) => (v === null || !Number.isFinite(v) ? '—' : v.toFixed(3));

/**
 * Live curves of a run: history from the server, then points from the worker. Drawn with uPlot on a canvas:
 * a redraw is a single short main-thread task and nothing runs between redraws, so the page stays responsive
 * while a worker trains. Angular does not re-render anything for a new point.
 */
@Component({
  selector: 'nw-run-curves',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `<div #host class="chart" role="img" aria-label="Training curves: bounds and noise figures by step"></div>`,
  styles: `.chart { width: 100%; min-height: ${HEIGHT}px; }`,
})
export class RunCurves {
  /** Points already stored on the server, by series. */
  readonly history = input<Record<string, { steps: number[]; values: number[] }>>({});
  /** New points while the run trains in this tab. */
  readonly live = input<Observable<CurvePoint[]> | null>(null);
  /** The model family: decides the series and their names (exact figures are never called bounds). */
  readonly family = input<'ssm' | 'gru' | 'ngram'>('ssm');
  private readonly host = viewChild.required<ElementRef<HTMLDivElement>>('host');
  private plot: uPlot | null = null;
  private readonly data = new Map<string, [number, number][]>(curveLines('ssm').map((l) => [l.key, []]));
  private subscription: Subscription | null = null;
  private renderTimer: ReturnType<typeof setTimeout> | null = null;
  private frame = 0;
  private lastRender = 0;

  constructor() {
    const destroyRef = inject(DestroyRef);
    afterNextRender(() => {
      const host = this.host().nativeElement;
      this.plot = new uPlot(this.options(Math.max(320, host.clientWidth)), this.aligned(), host);
      this.reset(this.history());
      this.subscription = this.live()?.subscribe((points) => this.append(points)) ?? null;
      // Resize in the next frame, not inside the observer: resizing the plot changes the host's height, and a
      // layout change inside the callback would make the observer report a loop.
      let frame = 0;
      const resizer = new ResizeObserver(() => {
        cancelAnimationFrame(frame);
        frame = requestAnimationFrame(() => {
          const width = Math.max(320, host.clientWidth);
          if (this.plot && Math.abs(this.plot.width - width) > 1) this.plot.setSize({ width, height: HEIGHT });
        });
      });
      resizer.observe(host);
      destroyRef.onDestroy(() => {
        resizer.disconnect();
        cancelAnimationFrame(frame);
        this.subscription?.unsubscribe();
        if (this.renderTimer !== null) clearTimeout(this.renderTimer);
        cancelAnimationFrame(this.frame);
        this.plot?.destroy();
      });
    });
  }

  /** Replaces everything with the stored history (after loading, or after resuming from a checkpoint). */
  reset(history: Record<string, { steps: number[]; values: number[] }>): void {
    for (const l of curveLines('ssm')) {
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

  /**
   * Redraws at most about once a second while points stream in, in the animation frame that follows the
   * message that brought them — the same frame that shows the new progress figures, so the page paints once a
   * second, not twice. Points that arrive sooner wait; a trailing timer draws the last ones.
   */
  private scheduleRender(): void {
    if (this.frame !== 0) return;
    if (performance.now() - this.lastRender >= RENDER_EVERY_MS - 100) {
      if (this.renderTimer !== null) clearTimeout(this.renderTimer);
      this.renderTimer = null;
      this.frame = requestAnimationFrame(() => {
        this.frame = 0;
        this.render();
      });
    } else if (this.renderTimer === null) {
      this.renderTimer = setTimeout(() => {
        this.renderTimer = null;
        this.scheduleRender();
      }, RENDER_EVERY_MS + 500);
    }
  }

  private aligned(): uPlot.AlignedData {
    return alignSeries(curveLines(this.family()).map((l) => this.data.get(l.key) ?? [])) as uPlot.AlignedData;
  }

  private render(): void {
    this.lastRender = performance.now();
    this.plot?.setData(this.aligned());
    // Point counts and the last step on the host element (read by the end-to-end test; no Angular re-render).
    const host = this.host().nativeElement;
    host.dataset['points'] = String([...this.data.values()].reduce((n, list) => n + list.length, 0));
    host.dataset['lastStep'] = String(this.data.get(SERIES.train)?.at(-1)?.[0] ?? 0);
  }

  private options(width: number): uPlot.Options {
    // uPlot merges options over its defaults, so a key set to undefined would erase a default: add `side` only when given.
    const axis = (label: string, scale: string, side?: 1): uPlot.Axis => ({
      label, scale, ...(side ? { side } : {}), font: AXIS_FONT, labelFont: AXIS_FONT, stroke: '#4a4a44',
      grid: { show: side !== 1, stroke: '#e6dfd0', width: 1 }, ticks: { stroke: '#d6cfbf', width: 1 },
    });
    return {
      width, height: HEIGHT,
      scales: { x: { time: false } },
      cursor: { drag: { x: false, y: false } },
      legend: { live: true },
      axes: [
        { ...axis('step', 'x'), grid: { show: false }, incrs: STEP_TICKS },
        axis('bits/char (end-of-word counted)', 'bits'),
        axis('bits', 'info', 1),
      ],
      series: [
        { label: 'step', value: (_u, v) => (v === null ? '—' : String(v)) },
        ...curveLines(this.family()).map((l): uPlot.Series => ({
          label: l.name, scale: l.scale, stroke: l.color, width: 2, spanGaps: true, value: fixed3,
          points: l.points ? { show: true, size: 5, fill: l.color } : { show: false },
        })),
      ],
    };
  }
}
