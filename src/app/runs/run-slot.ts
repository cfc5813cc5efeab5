/** The state the run scheduler keeps per run of this tab, and the small rules it applies to it. */
import type { RunStatus } from '../../../shared/api/runs';
import { ApiError, messageOf } from '../core/api-error';
import { fromBoundaryError, type TrainerHandle } from '../workers/trainer-client';
import type { CurvePoint, LiveRun } from './live-run';

export const FLUSH_EVERY_MS = 5000;
/** How long signing out waits for the runs of this tab to stop and save. */
export const SIGN_OUT_WAIT_MS = 20_000;
export const FLUSH_AT_POINTS = 500;
/** Points kept for a retry while the server cannot be reached (the newest ones). */
export const MAX_BUFFERED_POINTS = 50_000;

/** A sentence for an error from the server (through HttpClient) or from the worker (through comlink). */
export function problemOf(error: unknown): string {
  return error instanceof ApiError ? messageOf(error) : fromBoundaryError(error).message;
}

export const lockName = (runId: string) => `noisewright-run:${runId}`;

/** Fresh samples kept in the run's summary, so a reloaded page still shows the last ones. */
export const LAST_SAMPLES_KEPT = 12;

/** The last progress reached the run's final step (the worker's loop returns right after it). */
export function atLastStep(slot: Slot): boolean {
  const p = slot.live.progress();
  return !!p && p.totalSteps > 0 && p.step >= p.totalSteps;
}

export interface Slot {
  live: LiveRun; handle: TrainerHandle | null; buffer: CurvePoint[]; lastFlush: number; saving: boolean; nextSave: number;
  /** The flush in flight: flushes run one after another, never side by side. */
  flushing: Promise<void> | null;
  best: { bits: number; step: number; bitsPerWord?: number } | null;
  /** The worker's training loop has returned: no pause or resume reaches it any more. */
  ending: boolean;
  /** The save under way (autosave or by hand), so the final save waits for it instead of racing it. */
  saveWork: Promise<void> | null;
  /** The status update under way (pause / resume), so the end of training is sent after it. */
  statusWork: Promise<void> | null;
  /** The status this tab last had the server accept. */
  sentStatus: RunStatus | null;
}

export const AT_END_NOTICE = 'This run had already reached its last step and finishes now: there was nothing to pause.';

