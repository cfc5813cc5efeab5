/**
 * The page-side state of one run that trains (or waits to train) in this tab. Signals hold what templates
 * show; the curve points go out on a plain stream so the chart can `setOption` without re-rendering the page.
 */
import { signal } from '@angular/core';
import { Subject } from 'rxjs';
import type { CheckpointDto, RunDto } from '../../../shared/api/runs';
import { metricPointsOf, type CurvePoint } from '../../../shared/training/metric-points';
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
export { SERIES, type CurvePoint } from '../../../shared/training/metric-points';

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
  readonly lastValidation = signal<{ step: number; bitsPerChar: number; bitsPerWord: number } | null>(null);
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
    return metricPointsOf(p);
  }
}
