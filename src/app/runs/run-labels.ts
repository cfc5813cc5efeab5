import type { RunFamily, RunStatus } from '../../../shared/api/runs';
import type { FlowKind } from '../../../shared/model/flows/flow';

export const FAMILY_LABELS: Record<RunFamily, string> = {
  ssm: 'Stochastic state-space model',
  gru: 'Teacher-forced GRU',
  ngram: 'Character n-gram (Kneser–Ney)',
};

export const FAMILY_SHORT: Record<RunFamily, string> = { ssm: 'State-space', gru: 'GRU', ngram: 'n-gram' };

export const STATUS_LABELS: Record<RunStatus, string> = {
  queued: 'Waiting',
  training: 'Training',
  paused: 'Paused',
  finished: 'Finished',
  stopped: 'Stopped',
  failed: 'Failed',
};

export const FLOW_LABELS: Record<FlowKind, string> = {
  shift: 'Shift',
  diag: 'Diagonal shift-scale',
  tril: 'Triangular shift-scale',
  coupling: 'Coupling',
};

/** "1 h 05 min", "3 min 20 s", "12 s". */
export function formatDuration(seconds: number | null | undefined): string {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return '—';
  const s = Math.max(0, Math.round(seconds));
  if (s >= 3600) return `${Math.floor(s / 3600)} h ${String(Math.floor((s % 3600) / 60)).padStart(2, '0')} min`;
  if (s >= 60) return `${Math.floor(s / 60)} min ${String(s % 60).padStart(2, '0')} s`;
  return `${s} s`;
}
