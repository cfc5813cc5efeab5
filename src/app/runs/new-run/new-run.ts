import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule, Validators, type AbstractControl } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatChipsModule } from '@angular/material/chips';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import { MatStepperModule } from '@angular/material/stepper';
import { Router, RouterLink } from '@angular/router';
import type { CorpusSummary } from '../../../../shared/api/corpora';
import type { RunPlacement } from '../../../../shared/api/runners';
import { FLOW_KINDS, type FlowKind } from '../../../../shared/model/flows/flow';
import { ApiError, messageOf } from '../../core/api-error';
import { roleAtLeast } from '../../core/api-types';
import { CurrentBench } from '../../benches/current-bench';
import { PlacementChoice } from '../../runners/placement-choice/placement-choice';
import { applyServerErrors } from '../../ui/form-messages';
import { FAMILY_LABELS, FLOW_LABELS, formatDuration } from '../run-labels';
import { applyPreset, createRunForm, createRunRequest, trainerSettingsFromForm, type PRESETS } from '../run-form';
import { RunScheduler } from '../run-scheduler';
import { parameterCountOf } from '../run-trainer-settings';
import { RunsApi } from '../runs-api';
import { estimateFromProbe } from '../time-estimate';
import { TimeProbe } from '../time-estimate-probe';
import type { ProbeResult } from '../../workers/trainer-api';

/** Inline message for a numeric or text control: what is wrong and how to fix it. */
export function fieldMessage(c: AbstractControl, label: string): string {
  const e = c.errors;
  if (!e) return '';
  if (typeof e['server'] === 'string') return e['server'];
  if (e['required']) return `Enter ${label}.`;
  if (e['pattern']) return `Enter ${label} as a whole number.`;
  if (e['min']) return `Use ${label} of at least ${(e['min'] as { min: number }).min}.`;
  if (e['max']) return `Use ${label} of at most ${(e['max'] as { max: number }).max}.`;
  if (e['maxlength']) return `Use at most ${(e['maxlength'] as { requiredLength: number }).requiredLength} characters.`;
  if (e['noLayers']) return `Add at least one layer to the ${label}.`;
  if (e['tooManyLayers']) return `Use at most 8 layers in the ${label}.`;
  return `Check ${label}.`;
}

/** The new-run form: data, model, training, review — with the parameter count and a rough time estimate. */
@Component({
  selector: 'nw-new-run',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    DecimalPipe, ReactiveFormsModule, RouterLink, MatButtonModule, MatCheckboxModule, MatChipsModule, MatFormFieldModule, MatIconModule,
    MatInputModule, MatRadioModule, MatSelectModule, MatStepperModule, PlacementChoice,
  ],
  templateUrl: './new-run.html',
  styleUrl: './new-run.scss',
})
export class NewRun {
  readonly benchId = input.required<string>();
  protected readonly bench = inject(CurrentBench);
  private readonly api = inject(RunsApi);
  private readonly scheduler = inject(RunScheduler);
  private readonly router = inject(Router);

  protected readonly form = createRunForm();
  protected readonly flowKinds = FLOW_KINDS;
  protected readonly flowLabels = FLOW_LABELS;
  protected readonly familyLabels = FAMILY_LABELS;
  protected readonly families = ['ssm', 'gru', 'ngram'] as const;
  protected readonly msg = fieldMessage;
  protected readonly corpora = signal<CorpusSummary[]>([]);
  protected readonly problem = signal<string | null>(null);
  protected readonly busy = signal(false);
  /** Where the run trains: this tab's scheduler, or the server's runners (the tab then only watches). */
  protected readonly placement = signal<RunPlacement>('tab');

  private readonly value = toSignal(this.form.valueChanges, { initialValue: this.form.getRawValue() });
  protected readonly family = computed(() => { this.value(); return this.form.controls.model.controls.family.value; });
  private readonly corpus = computed(() => { this.value(); return this.corpora().find((c) => c.id === this.form.controls.data.controls.corpusId.value) ?? null; });
  protected readonly corpusName = computed(() => this.corpus()?.name ?? null);
  /** Viewers may look at the form but not fill it in or start a run (the server refuses them too). */
  protected readonly canStart = computed(() => roleAtLeast(this.bench.current()?.role ?? 'viewer', 'member'));
  /** Stands in for each step's controls for a viewer: never valid, so the steps after the first stay closed. */
  protected readonly closedStep = new FormControl<string | null>(null, Validators.required);
  /** Trainable scalars, from the shared/model parameter tables (null: n-gram, or a setting is invalid). */
  protected readonly parameterCount = computed(() => {
    this.value();
    if (this.form.controls.model.invalid) return null;
    try {
      return parameterCountOf(trainerSettingsFromForm(this.form.getRawValue()), (this.corpus()?.alphabetSize ?? 26) + 1);
    } catch {
      return null;
    }
  });
  private readonly timeProbe = inject(TimeProbe);
  /** True while the last step (check and start) is open: the time probe runs only there. */
  protected readonly onLastStep = signal(false);
  private readonly probe = signal<{ key: string; result?: ProbeResult; error?: string } | null>(null);
  /** The run's time measured on this computer by a short probe in a worker (time-estimate.ts). */
  protected readonly estimate = computed(() => {
    this.value();
    if (this.form.invalid) return '—';
    const settings = trainerSettingsFromForm(this.form.getRawValue());
    if (settings.family === 'ngram') return 'a few seconds (counted, no training steps)';
    const p = this.probe();
    if (!p || p.key !== this.probeKey()) return 'measuring on this computer…';
    if (!p.result) return `— (could not measure: ${p.error ?? 'unknown error'})`;
    const e = estimateFromProbe(p.result, settings);
    const perStep = e.secondsPerStep >= 10 ? e.secondsPerStep.toFixed(0) : e.secondsPerStep.toPrecision(2);
    return `measured on this computer: about ${perStep} s per step → about ${formatDuration(e.totalSeconds)}`;
  });

  constructor() {
    inject(DestroyRef).onDestroy(() => this.timeProbe.cancel()); // leaving the form ends a probe still running
    effect(() => {
      this.value();
      if (this.onLastStep()) untracked(() => this.measureTime());
    });
    effect(() => {
      if (this.canStart()) this.form.enable();
      else this.form.disable();
    });
    effect(() => {
      const id = this.benchId();
      untracked(() => {
        this.api.corpora(id).then((c) => this.corpora.set(c)).catch((e: unknown) => this.problem.set(messageOf(e)));
      });
    });
  }

  /** What the probe depends on (not the number of steps, the seed or the measuring interval). */
  private probeKey(): string {
    const v = this.form.getRawValue();
    return JSON.stringify([v.data.corpusId, v.model, { ...v.training, steps: 0, seed: 0, evalEvery: 0, checkpointEvery: 0 }]);
  }

  private measureTime(): void {
    const corpus = this.corpus();
    if (this.form.invalid || !corpus || this.form.controls.model.controls.family.value === 'ngram') return;
    const key = this.probeKey();
    if (this.probe()?.key === key) return;
    this.probe.set({ key });
    this.timeProbe.measure(this.benchId(), corpus.id, corpus.alphabetSize, trainerSettingsFromForm(this.form.getRawValue()))
      .then((result) => { if (this.probe()?.key === key) this.probe.set({ key, result }); })
      .catch((e: unknown) => { if (this.probe()?.key === key) this.probe.set({ key, error: messageOf(e) }); });
  }

  protected preset(name: keyof typeof PRESETS): void {
    applyPreset(this.form, name);
  }

  protected stack(which: 'generativeFlow' | 'inferenceFlow'): FormControl<FlowKind[]> {
    return this.form.controls.model.controls[which];
  }

  protected addLayer(which: 'generativeFlow' | 'inferenceFlow', kind: FlowKind): void {
    const c = this.stack(which);
    c.setValue([...c.value, kind]);
    c.markAsTouched();
  }

  protected removeLayer(which: 'generativeFlow' | 'inferenceFlow', index: number): void {
    const c = this.stack(which);
    c.setValue(c.value.filter((_, i) => i !== index));
    c.markAsTouched();
  }

  protected async start(): Promise<void> {
    if (!this.canStart()) {
      this.problem.set('Viewers cannot start runs. Ask a coach or owner of the bench for the member role.');
      return;
    }
    this.form.markAllAsTouched();
    if (this.form.invalid) {
      this.problem.set('Some settings need fixing; the steps marked in red say what to change.');
      return;
    }
    this.busy.set(true);
    this.problem.set(null);
    try {
      const run = await this.api.create(this.benchId(), { ...createRunRequest(this.form.getRawValue()), placement: this.placement() });
      if (run.placement !== 'runners') await this.scheduler.enqueue(this.benchId(), run);
      await this.router.navigate(['/benches', this.benchId(), 'runs', run.id]);
    } catch (error) {
      if (error instanceof ApiError && Object.keys(error.fields).length > 0) {
        const fields = Object.fromEntries(Object.entries(error.fields).map(([k, v]) => [k.split('.').at(-1) ?? k, v]));
        const groups = [this.form.controls.data, this.form.controls.model, this.form.controls.training];
        const unmatched = groups.map((g) => new Set(applyServerErrors(g, fields)));
        // A message is left over only when no group had a control for it.
        const left = Object.values(fields).filter((m) => unmatched.every((u) => u.has(m)));
        this.problem.set([error.message, ...new Set(left)].join(' '));
      } else {
        this.problem.set(messageOf(error));
      }
    } finally {
      this.busy.set(false);
    }
  }
}
