import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, ViewEncapsulation, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { gridFigures, type ReportDto } from '../../../../shared/api/reports';
import { messageOf } from '../../core/api-error';
import { CompareCurves, type RunCurve } from '../../compare/compare-curves/compare-curves';
import { compareRows } from '../../compare/compare-rows';
import { CompareTable } from '../../compare/compare-table/compare-table';
import { axisChoice } from '../../grids/grid-axes';
import { GridHeatmap } from '../../grids/grid-heatmap/grid-heatmap';
import { heatmapData } from '../../grids/grid-heatmap/heatmap-data';
import { LearnabilityVerdictTable } from '../../grids/learnability-verdict/learnability-verdict';
import { EvaluationCharts } from '../../evaluation/evaluation-charts/evaluation-charts';
import { EvaluationFigures } from '../../evaluation/evaluation-figures/evaluation-figures';
import { ReportsApi } from '../reports-api';

const KIND_LABELS = { evaluation: 'Evaluation', comparison: 'Comparison', grid: 'Grid' } as const;

/**
 * A saved report: the frozen tables and charts of an evaluation, a comparison or a grid, downloads of its CSV
 * and JSON, and a print layout (no navigation, charts sized for A4, black text).
 */
@Component({
  selector: 'nw-report-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  encapsulation: ViewEncapsulation.None,
  imports: [DatePipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, CompareTable, CompareCurves, GridHeatmap,
    LearnabilityVerdictTable, EvaluationFigures, EvaluationCharts],
  templateUrl: './report-page.html',
  styleUrl: './report-page.scss',
})
export class ReportPage {
  readonly benchId = input.required<string>();
  readonly reportId = input.required<string>();
  private readonly api = inject(ReportsApi);
  protected readonly kindLabels = KIND_LABELS;
  protected readonly report = signal<ReportDto | null>(null);
  protected readonly problem = signal<string | null>(null);

  protected readonly runs = computed(() => this.report()?.snapshot.runs ?? []);
  protected readonly rows = computed(() => compareRows(this.runs(), this.report()?.snapshot.evaluations));
  protected readonly curves = computed(() => this.curvesOf('valid_bound'));
  protected readonly trainCurves = computed(() => this.curvesOf('train_bound'));
  protected readonly evaluation = computed(() => this.report()?.snapshot.evaluation ?? null);
  protected readonly ssmResult = computed(() => {
    const r = this.evaluation()?.results;
    return r && r.family === 'ssm' ? r : null;
  });
  protected readonly grid = computed(() => this.report()?.snapshot.grid ?? null);
  protected readonly heat = computed(() => {
    const g = this.grid();
    if (!g || g.axes.length === 0) return null;
    return heatmapData(g, g.figure, g.axes.length > 1 ? 1 : 0, g.axes.length > 1 ? 0 : null, (k) => axisChoice(k)?.label ?? k);
  });
  /** Figures of the report in long format (as in the CSV); a grid snapshot's rows are rebuilt when missing. */
  protected readonly figures = computed(() => {
    const r = this.report();
    if (!r) return [];
    if (r.snapshot.figures.length > 0 || !r.snapshot.grid) return r.snapshot.figures;
    return gridFigures(r.snapshot.grid, r.snapshot.verdict);
  });

  constructor() {
    effect(() => {
      const [benchId, reportId] = [this.benchId(), this.reportId()];
      untracked(() => {
        this.api.get(benchId, reportId)
          .then((r) => { this.report.set(r); this.problem.set(null); })
          .catch((e) => this.problem.set(`The report could not be loaded: ${messageOf(e)}`));
      });
    });
  }

  private curvesOf(series: string): RunCurve[] {
    const curves = this.report()?.snapshot.curves ?? {};
    return this.runs().map((r) => ({ name: r.name, steps: curves[r.id]?.[series]?.steps ?? [], values: curves[r.id]?.[series]?.values ?? [] }));
  }

  protected print(): void { window.print(); }

  protected async download(format: 'csv' | 'json'): Promise<void> {
    const r = this.report();
    if (!r) return;
    try {
      const blob = await this.api.download(this.benchId(), r.id, format);
      const url = URL.createObjectURL(blob);
      const a = document.createElement('a');
      a.href = url;
      a.download = `${r.title.replace(/[^\p{L}\p{N}._-]+/gu, '-').slice(0, 80) || 'report'}.${format}`;
      a.click();
      setTimeout(() => URL.revokeObjectURL(url), 1000);
    } catch (error) {
      this.problem.set(`The ${format.toUpperCase()} download failed: ${messageOf(error)}`);
    }
  }

  protected show(v: number | string): string {
    return typeof v === 'number' ? (Number.isInteger(v) ? v.toLocaleString('en-US') : v.toFixed(4)) : v;
  }
}
