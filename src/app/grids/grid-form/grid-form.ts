import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import { startWith } from 'rxjs';
import type { CorpusSummary } from '../../../../shared/api/corpora';
import type { RunPlacement } from '../../../../shared/api/runners';
import { GRID_FIGURE_LABELS, GRID_FIGURES, MAX_GRID_AXES, MAX_GRID_CELLS } from '../../../../shared/api/grids';
import { RUN_FAMILIES, type RunFamily } from '../../../../shared/api/runs';
import { CurrentBench } from '../../benches/current-bench';
import { roleAtLeast } from '../../core/api-types';
import { PlacementChoice } from '../../runners/placement-choice/placement-choice';
import { controlMessage, formProblem } from '../../ui/form-messages';
import { FAMILY_LABELS } from '../../runs/run-labels';
import { RunsApi } from '../../runs/runs-api';
import { axisChoice, axisChoicesFor } from '../grid-axes';
import { GridsApi } from '../grids-api';
import { cellCountOf, createAxisGroup, createGridForm, createGridRequest } from './grid-form-model';

/** A new grid: corpus, model family, a small training budget, and up to three axes of settings to vary. */
@Component({
  selector: 'nw-grid-form',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule, PlacementChoice],
  templateUrl: './grid-form.html',
  styleUrl: './grid-form.scss',
})
export class GridForm {
  readonly benchId = input.required<string>();
  private readonly runsApi = inject(RunsApi);
  private readonly api = inject(GridsApi);
  private readonly router = inject(Router);
  protected readonly bench = inject(CurrentBench);

  protected readonly form = createGridForm();
  protected readonly families = RUN_FAMILIES;
  protected readonly familyLabels = FAMILY_LABELS;
  protected readonly figures = GRID_FIGURES;
  protected readonly figureLabels = GRID_FIGURE_LABELS;
  protected readonly maxAxes = MAX_GRID_AXES;
  protected readonly maxCells = MAX_GRID_CELLS;
  protected readonly corpora = signal<CorpusSummary[]>([]);
  protected readonly problem = signal<string | null>(null);
  protected readonly busy = signal(false);
  /** Where the grid's runs train (runners by default when any is online). */
  protected readonly placement = signal<RunPlacement>('tab');
  protected readonly canStart = computed(() => roleAtLeast(this.bench.current()?.role ?? 'viewer', 'member'));

  private readonly value = toSignal(this.form.valueChanges.pipe(startWith(null)));
  protected readonly cellCount = computed(() => { this.value(); return cellCountOf(this.form.controls.axes.getRawValue()); });
  protected readonly family = computed(() => { this.value(); return this.form.controls.family.value; });
  protected readonly axisChoices = computed(() => axisChoicesFor(this.family()));

  constructor() {
    effect(() => {
      const id = this.benchId();
      untracked(() => {
        void this.runsApi.corpora(id).then((c) => this.corpora.set(c)).catch((e) => this.problem.set(formProblem(e, this.form)));
      });
    });
    // A family change keeps only the axes that apply to the new family.
    this.form.controls.family.valueChanges.subscribe((family) => this.keepAxesOf(family));
  }

  protected valuesOf(key: string) { return axisChoice(key)?.values ?? []; }
  protected message(name: 'name' | 'corpusId' | 'steps' | 'batchSize' | 'learningRate' | 'evalEvery' | 'checkpointEvery', label: string): string {
    return controlMessage(this.form.controls[name], label);
  }

  protected axesProblem(): string | null {
    const errors = this.form.controls.axes.errors;
    if (errors?.['tooManyCells']) {
      return `This grid has ${errors['tooManyCells']} cells; at most ${MAX_GRID_CELLS} are allowed. Remove values or an axis.`;
    }
    if (errors?.['sameKey']) return 'Each setting can be on one axis only. Choose another setting or remove the axis.';
    return null;
  }

  protected axisMessage(i: number): string {
    const g = this.form.controls.axes.at(i);
    if (g.controls.key.invalid) return 'Choose the setting of this axis.';
    if (g.controls.values.invalid) return 'Choose at least one value.';
    return '';
  }

  protected addAxis(): void {
    if (this.form.controls.axes.length >= MAX_GRID_AXES) return;
    const used = new Set(this.form.controls.axes.getRawValue().map((a) => a.key));
    const next = this.axisChoices().find((c) => !used.has(c.key));
    this.form.controls.axes.push(createAxisGroup(next?.key ?? '', next ? [0] : []));
  }

  protected removeAxis(i: number): void {
    this.form.controls.axes.removeAt(i);
  }

  protected keyChanged(i: number): void {
    this.form.controls.axes.at(i).controls.values.setValue([]);
  }

  private keepAxesOf(family: RunFamily): void {
    const axes = this.form.controls.axes;
    for (let i = axes.length - 1; i >= 0; i--) {
      if (!axisChoice(axes.at(i).controls.key.value)?.families.includes(family)) axes.removeAt(i);
    }
    if (axes.length === 0) {
      const first = axisChoicesFor(family)[0]!;
      axes.push(createAxisGroup(first.key, [0, 1]));
    }
  }

  protected async submit(): Promise<void> {
    this.form.markAllAsTouched();
    if (!this.canStart()) { this.problem.set('Viewers cannot start grids. Ask a coach or owner of the bench for the member role.'); return; }
    if (this.form.invalid) {
      this.problem.set(this.axesProblem() ?? 'Some fields need attention: correct the marked ones and try again.');
      return;
    }
    this.busy.set(true);
    this.problem.set(null);
    try {
      const grid = await this.api.create(this.benchId(), { ...createGridRequest(this.form), placement: this.placement() });
      await this.router.navigate(['/benches', this.benchId(), 'grids', grid.id]);
    } catch (error) {
      this.problem.set(formProblem(error, this.form, 'The grid was not created.'));
    } finally {
      this.busy.set(false);
    }
  }
}
