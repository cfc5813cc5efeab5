/**
 * The page-side state of one run that trains (or waits to train) in this tab. Signals hold what templates
 * show; the curve points go out on a plain stream so the chart can `setOption` without re-rendering the page.
 */
import { signal } from '@angular/core';
import { Subject } from 'rxjs';
import type { CheckpointDto, RunDto } from '../../../shared/api/runs';
import type { EngineInfo, TrainingProgress } from '../workers/trainer-api';

export type LiveState = 'waiting' | 'starting' | 'training' | 'paused' | 'stopping' | 'finished' | 'stopped' | 'failed'
  /** Another tab of this browser trains the run (it holds the run's lock); this tab leaves it alone. */
  | 'elsewhere';

/** What people read for each state. */
export const LIVE_STATE_LABELS: Record<LiveState, string> = {
  waiting: 'waiting', starting: 'starting', training: 'training', paused: 'paused', stopping: 'stopping',
  finished: 'finished', stopped: 'stopped', failed: 'failed', elsewhere: 'in another tab',
};

/** Metric series names written to the server (see KNOWN_METRIC_SERIES in shared/api/runs.ts). */
export const SERIES = {
  train: 'train_bound',
  validation: 'valid_bound',
  entropy: 'obs_entropy',
  noise: 'noise_mi',
  speed: 'words_per_second',
} as const;

export interface CurvePoint { series: string; step: number; value: number }

export class LiveRun {
  readonly state = signal<LiveState>('waiting');
  readonly progress = signal<TrainingProgress | null>(null);
  readonly engine = signal<EngineInfo | null>(null);
  /** A sentence for people when the run failed or could not start. */
  readonly problem = signal<string | null>(null);
  /** A plain remark that is no failure (e.g. a pause that came after the last step). */
  readonly notice = signal<string | null>(null);
  readonly samples = signal<string[]>([]);
  /** The latest validation figures of this session (they come with some progress messages only). */
  readonly lastValidation = signal<{ step: number; bitsPerChar: number; bitsPerWord: number; exact: boolean } | null>(null);
  /** Step of the last checkpoint saved to the server in this session. */
  readonly lastSavedStep = signal<number | null>(null);
  readonly points = new Subject<CurvePoint[]>();
  /** Emits the stored checkpoint after a save, so lists can show it without asking the server again. */
  readonly checkpointSaved = new Subject<CheckpointDto>();

  constructor(
    readonly benchId: string,
    readonly run: RunDto,
    /** Checkpoint to resume from (null = fresh start from the seed). */
    readonly fromCheckpointId: string | null,
  ) {}

  get id(): string {
    return this.run.id;
  }

  get isActive(): boolean {
    const s = this.state();
    return s === 'starting' || s === 'training' || s === 'paused' || s === 'stopping';
  }

  /** The points a progress message adds to the curves. */
  static pointsOf(p: TrainingProgress): CurvePoint[] {
    const out: CurvePoint[] = [];
    if (p.totalSteps > 0) out.push({ series: SERIES.train, step: p.step, value: p.trainBitsPerChar });
    if (p.totalSteps > 0 && p.wordsPerSecond > 0) out.push({ series: SERIES.speed, step: p.step, value: p.wordsPerSecond });
    const e = p.evaluation;
    if (e) {
      out.push({ series: SERIES.validation, step: e.step, value: e.validationBitsPerChar });
      if (e.observationEntropyBits !== null) out.push({ series: SERIES.entropy, step: e.step, value: e.observationEntropyBits });
      if (e.noiseInformationBits !== null) out.push({ series: SERIES.noise, step: e.step, value: e.noiseInformationBits });
    }
    return out.filter((pt) => Number.isFinite(pt.value));
  }
}
