/**
 * The side-by-side table of a comparison, as plain data: one row per setting or figure, one value per run,
 * and whether the runs differ on that row (pure functions, no Angular).
 */
import type { ComparisonEvaluation } from '../../../shared/api/reports';
import type { GruRunSettings, NgramRunSettings, RunDto, SsmRunSettings } from '../../../shared/api/runs';
import { figureKindText, NEUTRAL_NAMES } from '../../../shared/api/figure-names';
import { FAMILY_SHORT, STATUS_LABELS } from '../runs/run-labels';

/** Figures of a run's latest stored evaluation, when it has one (shared/api/reports.ts). */
export type EvaluationFigures = ComparisonEvaluation;

export interface CompareRow {
  key: string;
  label: string;
  group: 'setting' | 'figure';
  /** Unit shown after numbers ('' for none). */
  unit: string;
  /** One entry per run, in the order of the runs; null = does not apply or not known. */
  values: (string | number | null)[];
  /** True when at least two runs show different values (a missing value counts as a value). */
  differs: boolean;
}

/** Shown where a figure comes from an evaluation and the run has none yet. */
export const NOT_EVALUATED = 'not evaluated';

const flow = (layers: { kind: string }[]) => layers.map((l) => l.kind).join(' → ');

/** The settings of a run as labelled values (what applies to its family only). */
export function settingsOf(run: RunDto): Record<string, { label: string; value: string | number | null }> {
  const t = run.settings.training ?? {};
  const out: Record<string, { label: string; value: string | number | null }> = {
    family: { label: 'Model', value: FAMILY_SHORT[run.family] },
    corpus: { label: 'Corpus', value: run.corpus?.name ?? '(deleted)' },
    status: { label: 'Status', value: STATUS_LABELS[run.status] },
  };
  if (run.family === 'ssm') {
    const m = (run.settings as SsmRunSettings).model;
    out['stateSize'] = { label: 'State size', value: m.stateSize };
    out['generativeFlow'] = { label: 'Generative flow', value: flow(m.generativeFlow) };
    out['inferenceFlow'] = { label: 'Inference flow', value: flow(m.inferenceFlow) };
    out['flowHidden'] = { label: 'Flow network width', value: m.flowHidden };
    out['encoderSize'] = { label: 'Encoder width', value: m.encoderSize };
    out['embeddingSize'] = { label: 'Embedding size', value: m.embeddingSize };
    out['samples'] = { label: 'Samples per word (K)', value: t.samples ?? null };
    // Absent on runs stored before the setting existed: those trained with 1.
    out['observationInitScale'] = { label: 'Initial emission sharpness', value: t.observationInitScale ?? 1 };
  } else if (run.family === 'gru') {
    const m = (run.settings as GruRunSettings).model;
    out['stateSize'] = { label: 'State size', value: m.stateSize };
    out['embeddingSize'] = { label: 'Embedding size', value: m.embeddingSize };
  } else {
    out['order'] = { label: 'n-gram order', value: (run.settings as NgramRunSettings).model.order };
  }
  if (run.family !== 'ngram') {
    out['steps'] = { label: 'Steps', value: t.steps ?? null };
    out['batchSize'] = { label: 'Batch size', value: t.batchSize ?? null };
    out['learningRate'] = { label: 'Learning rate', value: t.learningRate ?? null };
    out['warmupSteps'] = { label: 'Warm-up steps', value: t.warmupSteps ?? null };
    out['regime'] = { label: 'Sampling', value: t.regime ?? null };
    out['seed'] = { label: 'Seed', value: t.seed ?? null };
  }
  return out;
}

const SETTING_ORDER = ['family', 'corpus', 'status', 'stateSize', 'generativeFlow', 'inferenceFlow', 'flowHidden', 'encoderSize',
  'embeddingSize', 'order', 'samples', 'observationInitScale', 'steps', 'batchSize', 'learningRate', 'warmupSteps', 'regime', 'seed'];

function differs(values: (string | number | null)[]): boolean {
  return values.length > 1 && values.some((v) => v !== values[0]);
}

/** Adds one figure row (numbers, or a text such as "not evaluated"). */
type FigureAdder = (key: string, label: string, unit: string, values: (number | string | null | undefined)[]) => void;

/** Figures of the latest stored evaluation; a run without one says so instead of a bare dash. */
function evaluationRows(runs: RunDto[], evaluations: Record<string, EvaluationFigures | undefined>, figure: FigureAdder): void {
  const ev = (pick: (e: EvaluationFigures) => number | null | undefined) =>
    runs.map((r) => { const e = evaluations[r.id]; return e ? pick(e) : NOT_EVALUATED; });
  figure('heldOut', 'Held-out cost (latest evaluation)', 'bits/char', ev((e) => e.heldOutBitsPerChar));
  figure('heldOutSe', '± standard error', 'bits/char', ev((e) => e.heldOutSeBitsPerChar));
  figure('heldOutWord', 'Held-out cost per word (latest evaluation)', 'bits/word', ev((e) => e.heldOutBitsPerWord));
  figure('heldOutWordSe', '± standard error per word', 'bits/word', ev((e) => e.heldOutSeBitsPerWord));
  figure('crossEntropy', 'Sequence cross entropy (latest evaluation)', 'bits/word', ev((e) => e.crossEntropyBitsPerWord));
  figure('noiseInformation', 'Noise mutual information', 'bits',
    runs.map((r) => (r.family !== 'ssm' ? null : evaluations[r.id] ? evaluations[r.id]!.meanNoiseInformationBits : NOT_EVALUATED)));
}

/**
 * The rows of the side-by-side table: settings first (in a fixed order), then the figures; without `evaluations`
 * (older reports) the evaluation rows are left out.
 */
export function compareRows(runs: RunDto[], evaluations?: Record<string, EvaluationFigures | undefined>): CompareRow[] {
  const settings = runs.map(settingsOf);
  const rows: CompareRow[] = [];
  for (const key of SETTING_ORDER) {
    if (!settings.some((s) => s[key])) continue;
    const label = settings.find((s) => s[key])![key]!.label;
    const values = settings.map((s) => s[key]?.value ?? null);
    rows.push({ key, label, group: 'setting', unit: '', values, differs: differs(values) });
  }
  const figure = (key: string, label: string, unit: string, values: (number | string | null | undefined)[]) => {
    const vs = values.map((v) => (typeof v === 'string' ? v : v === undefined || v === null || !Number.isFinite(v) ? null : v));
    rows.push({ key, label, group: 'figure', unit, values: vs, differs: differs(vs) });
  };
  // The SSM's training and validation figures are bounds, the GRU's and n-gram's exact: one neutral row name
  // and a row that says which kind each run's figures are (shared/api/figure-names.ts).
  const kinds = runs.map((r) => figureKindText(r.family));
  rows.push({ key: 'figureKind', label: NEUTRAL_NAMES.kind, group: 'figure', unit: '', values: kinds, differs: differs(kinds) });
  figure('lastBound', NEUTRAL_NAMES.training, 'bits/char', runs.map((r) => r.summary.lastBoundBitsPerChar));
  figure('bestValidation', NEUTRAL_NAMES.validation, 'bits/char', runs.map((r) => r.summary.bestValidationBitsPerChar));
  figure('bestValidationWord', `${NEUTRAL_NAMES.validation} per word`, 'bits/word', runs.map((r) => r.summary.bestValidationBitsPerWord));
  if (evaluations) evaluationRows(runs, evaluations, figure);
  figure('parameterCount', 'Parameters', '', runs.map((r) => r.summary.parameterCount));
  figure('wordsPerSecond', 'Training speed', 'words/s', runs.map((r) => r.summary.wordsPerSecond));
  figure('stepsDone', 'Steps done', '', runs.map((r) => r.stepsDone));
  return rows;
}

/** A value as the table shows it: numbers in a fixed number of decimals by kind. */
export function formatValue(row: CompareRow, value: string | number | null): string {
  if (value === null) return '—';
  if (typeof value === 'string') return value;
  if (row.unit === 'bits/char' || row.unit === 'bits/word' || row.unit === 'bits') return value.toFixed(3);
  if (row.key === 'learningRate') return String(value);
  if (row.unit === 'words/s') return value >= 100 ? Math.round(value).toLocaleString('en-US') : value.toFixed(1);
  return Number.isInteger(value) ? value.toLocaleString('en-US') : String(value);
}
