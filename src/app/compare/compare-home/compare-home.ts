import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import type { CorpusSummary } from '../../../../shared/api/corpora';
import { BITS_PER_CHAR, figureKind } from '../../../../shared/api/figure-names';
import { MAX_COMPARED_RUNS } from '../../../../shared/api/reports';
import type { RunDto } from '../../../../shared/api/runs';
import { CurrentBench } from '../../benches/current-bench';
import { messageOf } from '../../core/api-error';
import { FAMILY_SHORT, STATUS_LABELS } from '../../runs/run-labels';
import { RunsApi } from '../../runs/runs-api';
import { askReportTitle } from '../../ui/report-title-dialog/report-title-dialog';
import { CompareCurves, type RunCurve } from '../compare-curves/compare-curves';
import { compareRows, type EvaluationFigures } from '../compare-rows';
import { CompareTable } from '../compare-table/compare-table';
import { ComparisonSources } from '../comparison-sources';
import { ReportsApi } from '../../reports/reports-api';

export const CURVE_CHOICES = [
  // One series holds every family's figure: a bound for the state-space model, exact for GRU and n-gram.
  { series: 'train_bound', label: 'Training figure', unit: BITS_PER_CHAR },
  { series: 'valid_bound', label: 'Validation figure', unit: BITS_PER_CHAR },
  { series: 'noise_mi', label: 'Mean noise mutual information', unit: 'bits' },
  { series: 'obs_entropy', label: 'Observation entropy', unit: 'bits' },
] as const;

/** Pick runs of the bench, see them side by side and their curves overlaid; the choice lives in the link (?runs=). */
@Component({
  selector: 'nw-compare-home',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    RouterLink, MatButtonModule, MatCheckboxModule, MatFormFieldModule, MatIconModule, MatSelectModule, MatTableModule,
    CompareTable, CompareCurves,
  ],
  templateUrl: './compare-home.html',
  styleUrl: './compare-home.scss',
})
export class CompareHome {
  readonly benchId = input.required<string>();
  private readonly api = inject(RunsApi);
  private readonly sources = inject(ComparisonSources);
  private readonly reports = inject(ReportsApi);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  private readonly dialog = inject(MatDialog);
  protected readonly bench = inject(CurrentBench);
  protected readonly curveChoices = CURVE_CHOICES;
  protected readonly bitsPerChar = BITS_PER_CHAR;
  protected readonly figureKind = figureKind;
  protected readonly pickColumns = ['pick', 'name', 'family', 'corpus', 'status', 'bestBound'];

  protected readonly corpora = signal<CorpusSummary[]>([]);
  protected readonly corpusId = signal('');
  protected readonly runs = signal<RunDto[]>([]);
  protected readonly chosenIds = signal<string[]>([]);
  protected readonly problem = signal<string | null>(null);
  protected readonly curveProblem = signal<string | null>(null);
  protected readonly curveSeries = signal<(typeof CURVE_CHOICES)[number]['series']>('train_bound');
  protected readonly curves = signal<RunCurve[]>([]);
  protected readonly evaluations = signal<Record<string, EvaluationFigures | undefined>>({});
  /** Runs whose latest evaluation was already asked for on this visit. */
  private readonly evaluationsAsked = new Set<string>();
  protected readonly saving = signal(false);

  protected readonly visibleRuns = computed(() => this.runs().filter((r) => !this.corpusId() || r.corpus?.id === this.corpusId()));
  protected readonly chosen = computed(() => {
    const byId = new Map(this.runs().map((r) => [r.id, r]));
    return this.chosenIds().map((id) => byId.get(id)).filter((r): r is RunDto => !!r);
  });
  protected readonly rows = computed(() => compareRows(this.chosen(), this.evaluations()));
  protected readonly curveChoice = computed(() => CURVE_CHOICES.find((c) => c.series === this.curveSeries())!);

  constructor() {
    const fromLink = this.route.snapshot.queryParamMap.get('runs');
    if (fromLink) this.chosenIds.set(fromLink.split(',').filter(Boolean).slice(0, MAX_COMPARED_RUNS));
    effect(() => {
      const id = this.benchId();
      untracked(() => {
        void this.load(id);
      });
    });
    effect(() => {
      const runs = this.chosen();
      const series = this.curveSeries();
      untracked(() => void this.loadCurves(runs, series));
    });
    // Each run's latest evaluation is asked for once per visit: ticking one more run fetches only that run's.
    effect(() => {
      const runs = this.chosen();
      untracked(() => {
        const missing = runs.filter((r) => !this.evaluationsAsked.has(r.id));
        if (missing.length === 0) return;
        for (const r of missing) this.evaluationsAsked.add(r.id);
        void this.sources.evaluationFigures(this.benchId(), missing).then((found) => this.evaluations.update((old) => ({ ...old, ...found })));
      });
    });
  }

  private async load(benchId: string): Promise<void> {
    try {
      const [corpora, page] = await Promise.all([this.api.corpora(benchId), this.api.list(benchId, { limit: 200, sort: 'createdAt', dir: 'desc' })]);
      this.corpora.set(corpora);
      this.runs.set(page.items);
      this.problem.set(null);
    } catch (error) {
      this.problem.set(messageOf(error));
    }
  }

  private async loadCurves(runs: RunDto[], series: string): Promise<void> {
    try {
      const pages = await Promise.all(runs.map((r) => this.api.metrics(this.benchId(), r.id, [series])));
      this.curves.set(pages.map((p, i) => ({ name: runs[i]!.name, steps: p.series[series]?.steps ?? [], values: p.series[series]?.values ?? [] })));
      this.curveProblem.set(null);
    } catch (error) {
      this.curveProblem.set(`The curves could not be loaded: ${messageOf(error)}`);
    }
  }

  protected familyOf(run: RunDto): string { return FAMILY_SHORT[run.family]; }
  protected statusOf(run: RunDto): string { return STATUS_LABELS[run.status]; }
  protected isChosen(run: RunDto): boolean { return this.chosenIds().includes(run.id); }

  protected toggle(run: RunDto, on: boolean): void {
    const ids = this.chosenIds().filter((id) => id !== run.id);
    if (on) {
      if (ids.length >= MAX_COMPARED_RUNS) { this.problem.set(`Compare at most ${MAX_COMPARED_RUNS} runs at once: untick one first.`); return; }
      ids.push(run.id);
    }
    this.problem.set(null);
    this.chosenIds.set(ids);
    void this.router.navigate([], { relativeTo: this.route, queryParams: { runs: ids.join(',') || null }, replaceUrl: true });
  }

  protected async saveReport(): Promise<void> {
    const runs = this.chosen();
    const title = await askReportTitle(this.dialog, `Comparison of ${runs.map((r) => r.name).join(', ')}`.slice(0, 160));
    if (title === null) return;
    this.saving.set(true);
    try {
      const report = await this.reports.create(this.benchId(), { kind: 'comparison', title, sourceIds: runs.map((r) => r.id) });
      await this.router.navigate(['/benches', this.benchId(), 'reports', report.id]);
    } catch (error) {
      this.problem.set(`The report could not be saved: ${messageOf(error)}`);
    } finally {
      this.saving.set(false);
    }
  }
}
