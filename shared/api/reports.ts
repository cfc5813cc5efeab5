/**
 * Reports: a frozen copy of an evaluation, a comparison of runs or a grid, with a stable link
 * (`/benches/:benchId/reports/:reportId` in the client) and CSV / JSON exports, under
 * `/api/benches/:benchId/reports/...`. The server builds the snapshot from the sources when the report is
 * created, so later changes to the runs do not change a report. The long-format figure rows
 * (`section, name, setting, value, unit`) are built by the functions below, shared with the client so an
 * unsaved page exports the same rows.
 */
import { z } from 'zod';
import { safeText } from './safe-text';
import type { EvaluationDto } from './evaluations';
import { GRID_FIGURE_LABELS, type GridDto, type LearnabilityVerdict } from './grids';
import type { RunDto } from './runs';
import { BITS_PER_CHAR, BITS_PER_WORD, figureKind, figureKindText, isExactFamily, trainingFigureName, unitText, validationFigureName } from './figure-names';

export const REPORT_KINDS = ['evaluation', 'comparison', 'grid'] as const;
export type ReportKind = (typeof REPORT_KINDS)[number];
export const MAX_COMPARED_RUNS = 16;

/**
 * `POST /reports`: `sourceIds` is one evaluation id (kind `evaluation`), 1–16 run ids (`comparison`) or one
 * grid id (`grid`), all of this bench.
 */
export const createReportSchema = z
  .object({
    kind: z.enum(REPORT_KINDS, { error: 'Choose what the report holds: evaluation, comparison or grid.' }),
    title: safeText('Give the report a title.').trim().min(1, 'Give the report a title.').max(160, 'Use a title of at most 160 characters.'),
    sourceIds: z.array(z.string().uuid('Choose items of this bench.'), { error: 'Give sourceIds as a list of ids.' })
      .min(1, 'Choose at least one item for the report.')
      .max(MAX_COMPARED_RUNS, `Choose at most ${MAX_COMPARED_RUNS} items.`),
  })
  .strict()
  .refine((b) => b.kind === 'comparison' || b.sourceIds.length === 1, {
    message: 'An evaluation or grid report takes exactly one id.',
    path: ['sourceIds'],
  });
export type CreateReportRequest = z.input<typeof createReportSchema>;

/** One figure in long format: the CSV has one row per figure. */
export interface ReportFigure {
  /** Group of figures, e.g. `held-out`, `cross entropy`, `run`, `cell`. */
  section: string;
  /** What the figure is, e.g. `bits per char`. */
  name: string;
  /** Which run / cell / position / estimator setting it belongs to, e.g. `K=256, repeats=3` or a run name. */
  setting: string;
  value: number | string;
  unit: string;
}

/** A comparison's curves: per run, the validation and training bound series (at most 500 points each). */
export type ComparisonCurves = Record<string, Record<string, { steps: number[]; values: number[] }>>;

/**
 * The figures of a run's latest evaluation that a comparison shows (bits; null = not measured): held-out cost
 * with its standard error (tight estimate for the SSM, exact for GRU and n-gram), the sequence cross entropy
 * (exact for GRU and n-gram) and the mean noise MI (SSM only).
 */
export interface ComparisonEvaluation {
  crossEntropyBitsPerWord: number | null;
  meanNoiseInformationBits: number | null;
  heldOutBitsPerChar?: number | null;
  heldOutBitsPerWord?: number | null;
  /** Standard errors from the per-word spread and the repeats (shared/eval/standard-error.ts); null when not stored. */
  heldOutSeBitsPerChar?: number | null;
  heldOutSeBitsPerWord?: number | null;
}

export function comparisonEvaluation(e: EvaluationDto): ComparisonEvaluation {
  const r = e.results;
  if (r.family === 'ssm') {
    return {
      crossEntropyBitsPerWord: r.crossEntropy.shared.crossEntropyBits, meanNoiseInformationBits: r.noise.meanBits,
      heldOutBitsPerChar: r.tight.bitsPerChar, heldOutBitsPerWord: r.tight.bitsPerWord,
      heldOutSeBitsPerChar: r.tight.standardError?.bitsPerChar.total ?? null,
      heldOutSeBitsPerWord: r.tight.standardError?.bitsPerWord.total ?? null,
    };
  }
  return {
    crossEntropyBitsPerWord: r.crossEntropy.crossEntropyBits, meanNoiseInformationBits: null,
    heldOutBitsPerChar: r.heldOut.bitsPerChar, heldOutBitsPerWord: r.heldOut.bitsPerWord,
    heldOutSeBitsPerChar: r.heldOut.standardError?.bitsPerChar ?? null,
    heldOutSeBitsPerWord: r.heldOut.standardError?.bitsPerWord ?? null,
  };
}

export interface ReportSnapshot {
  figures: ReportFigure[];
  evaluation?: EvaluationDto;
  runs?: RunDto[];
  /** A comparison's latest evaluation per run id (absent for runs without one, and in older reports). */
  evaluations?: Record<string, ComparisonEvaluation>;
  curves?: ComparisonCurves;
  grid?: GridDto;
  verdict?: LearnabilityVerdict;
}

export interface ReportSummaryDto {
  id: string;
  benchId: string;
  kind: ReportKind;
  title: string;
  sourceIds: string[];
  createdBy: { id: string; displayName: string } | null;
  createdAt: string;
  /** The client route of the report (stable; bench members can open it). */
  link: string;
}

/** `GET /benches/:benchId/reports?limit=&offset=`: newest first. */
export interface ReportPage {
  items: ReportSummaryDto[];
  total: number;
}

export interface ReportDto extends ReportSummaryDto {
  snapshot: ReportSnapshot;
}

export const reportLink = (benchId: string, reportId: string): string => `/benches/${benchId}/reports/${reportId}`;

// ---------------------------------------------------------------- figure rows

const row = (section: string, name: string, setting: string, value: number | string | null | undefined, unit: string): ReportFigure[] =>
  value === null || value === undefined || (typeof value === 'number' && !Number.isFinite(value)) ? [] : [{ section, name, setting, value, unit }];

export function evaluationFigures(e: EvaluationDto): ReportFigure[] {
  const r = e.results;
  const out: ReportFigure[] = [];
  const at = `${e.run.name} step ${e.checkpoint.step}`;
  if (r.family === 'ssm') {
    const kSet = `${at}; K=${r.tight.k}, repeats=${r.tight.repeats}`;
    const se = r.tight.standardError;
    // Error bars: the standard error from the per-word spread and the repeats; older evaluations stored only
    // the spread over repeats, which is named for what it is.
    out.push(
      ...row('held-out', 'bits per word (bound)', kSet, r.tight.bitsPerWord, BITS_PER_WORD),
      ...(se ? row('held-out', 'bits per word standard error', kSet, se.bitsPerWord.total, BITS_PER_WORD)
        : row('held-out', 'bits per word spread over repeats (sd)', kSet, r.tight.stdBitsPerWord, BITS_PER_WORD)),
      ...row('held-out', 'bits per char (bound)', kSet, r.tight.bitsPerChar, BITS_PER_CHAR),
      ...(se ? row('held-out', 'bits per char standard error', kSet, se.bitsPerChar.total, BITS_PER_CHAR)
        : row('held-out', 'bits per char spread over repeats (sd)', kSet, r.tight.stdBitsPerChar, BITS_PER_CHAR)),
    );
    const ces: [string, typeof r.crossEntropy.shared | null][] = [[`S=${r.crossEntropy.samples}`, r.crossEntropy.shared], [`K=${r.crossEntropy.iwaeK}`, r.crossEntropy.iwae]];
    for (const [how, ce] of ces) {
      if (!ce) continue;
      out.push(
        ...row('cross entropy', 'H(p_data, p_model)', `${at}; ${how}`, ce.crossEntropyBits, 'bits/word'),
        ...row('cross entropy', 'H(p_data)', `${at}; ${how}`, ce.dataEntropyBits, 'bits/word'),
        ...row('cross entropy', 'KL gap', `${at}; ${how}`, ce.klGapBits, 'bits/word'),
        ...row('cross entropy', 'model mass on the corpus', `${at}; ${how}`, ce.modelMass, 'probability'),
      );
    }
    out.push(...row('noise', 'mean mutual information', `${at}; M=${r.noise.draws}`, r.noise.meanBits, 'bits'));
    out.push(...row('noise', 'upper end (log V)', at, r.noise.maxBits, 'bits'));
    for (const p of r.noise.perPosition) out.push(...row('noise', 'median mutual information', `${at}; t=${p.t}`, p.median, 'bits'));
    out.push(...row('observation entropy', 'state-space model', at, r.observationEntropy.meanBits, 'bits'));
    out.push(
      ...row('samples', 'count', at, r.samples.count, 'words'),
      ...row('samples', 'share in training split', at, r.samples.shares.train, 'share'),
      ...row('samples', 'share in held-out split', at, r.samples.shares.heldOut, 'share'),
      ...row('samples', 'share novel', at, r.samples.shares.novel, 'share'),
      ...row('samples', 'cut at Tmax', at, r.samples.truncated, 'words'),
    );
  } else {
    out.push(
      ...row('held-out', 'bits per word (exact)', at, r.heldOut.bitsPerWord, BITS_PER_WORD),
      ...row('held-out', 'bits per word standard error', at, r.heldOut.standardError?.bitsPerWord, BITS_PER_WORD),
      ...row('held-out', 'bits per char (exact)', at, r.heldOut.bitsPerChar, BITS_PER_CHAR),
      ...row('held-out', 'bits per char standard error', at, r.heldOut.standardError?.bitsPerChar, BITS_PER_CHAR),
      ...row('cross entropy', 'H(p_data, p_model) (exact)', at, r.crossEntropy.crossEntropyBits, 'bits/word'),
      ...row('cross entropy', 'H(p_data)', at, r.crossEntropy.dataEntropyBits, 'bits/word'),
      ...row('cross entropy', 'KL gap', at, r.crossEntropy.klGapBits, 'bits/word'),
      ...row('cross entropy', 'model mass on the corpus', at, r.crossEntropy.modelMass, 'probability'),
      ...row('observation entropy', r.family === 'gru' ? 'GRU' : 'n-gram', at, r.predictiveEntropy?.meanBits, 'bits'),
    );
  }
  const b = r.baselines;
  // Baselines are exact; bits per word beside bits per char.
  const baseline = (name: string, f: { bitsPerChar: number; bitsPerWord: number }) => [
    ...row('baselines', `${name} bits per char (exact)`, at, f.bitsPerChar, BITS_PER_CHAR),
    ...row('baselines', `${name} bits per word (exact)`, at, f.bitsPerWord, BITS_PER_WORD),
  ];
  out.push(...baseline('unigram', b.unigram));
  if (b.ngram) {
    out.push(...baseline(`${b.ngram.order}-gram`, b.ngram));
    out.push(...row('baselines', `${b.ngram.order}-gram H(p_data, p_model) (exact)`, at, b.ngram.crossEntropy.crossEntropyBits, BITS_PER_WORD));
  }
  if (b.gru) {
    out.push(...baseline('GRU', b.gru));
    out.push(...row('baselines', 'GRU H(p_data, p_model) (exact)', at, b.gru.crossEntropy.crossEntropyBits, BITS_PER_WORD));
    out.push(...row('observation entropy', 'GRU', at, b.gru.predictiveEntropy.meanBits, 'bits'));
  }
  return out;
}

/**
 * A comparison's rows: per run its family, whether its figures are bounds or exact, the training and validation
 * figures under their own names (never "bound" for GRU or n-gram), and, when given, its latest evaluation.
 */
export function comparisonFigures(runs: readonly RunDto[], evaluations: Record<string, ComparisonEvaluation> = {}): ReportFigure[] {
  return runs.flatMap((r) => {
    const e = evaluations[r.id];
    const heldOut = isExactFamily(r.family) ? 'held-out (exact)' : 'held-out (tight estimate, bound)';
    return [
      ...row('run', 'family', r.name, r.family, ''),
      ...row('run', 'figures are', r.name, figureKindText(r.family), ''),
      ...row('run', 'steps done', r.name, r.stepsDone, 'steps'),
      ...row('run', `final ${trainingFigureName(r.family, r.summary.lastIsBound ?? true).toLowerCase()}`, r.name, r.summary.lastBoundBitsPerChar, BITS_PER_CHAR),
      ...row('run', `best ${validationFigureName(r.family).toLowerCase()}`, r.name, r.summary.bestValidationBitsPerChar, BITS_PER_CHAR),
      ...row('run', `best ${validationFigureName(r.family).toLowerCase()} per word`, r.name, r.summary.bestValidationBitsPerWord, BITS_PER_WORD),
      ...row('run', 'parameters', r.name, r.summary.parameterCount, 'count'),
      ...row('run', 'training speed', r.name, r.summary.wordsPerSecond, 'words/s'),
      ...(e ? [
        ...row('latest evaluation', `${heldOut} bits per char`, r.name, e.heldOutBitsPerChar, BITS_PER_CHAR),
        ...row('latest evaluation', 'bits per char standard error', r.name, e.heldOutSeBitsPerChar, BITS_PER_CHAR),
        ...row('latest evaluation', `${heldOut} bits per word`, r.name, e.heldOutBitsPerWord, BITS_PER_WORD),
        ...row('latest evaluation', 'bits per word standard error', r.name, e.heldOutSeBitsPerWord, BITS_PER_WORD),
        ...row('latest evaluation', `sequence cross entropy${isExactFamily(r.family) ? ' (exact)' : ''}`, r.name, e.crossEntropyBitsPerWord, BITS_PER_WORD),
        ...row('latest evaluation', 'mean noise mutual information', r.name, e.meanNoiseInformationBits, 'bits'),
      ] : []),
    ];
  });
}

export function gridFigures(grid: GridDto, verdict?: LearnabilityVerdict): ReportFigure[] {
  const f = GRID_FIGURE_LABELS[grid.figure];
  const unit = unitText(f.unit);
  const out = grid.cells.flatMap((c) => [
    ...row('cell', f.label, c.label, c.figure, unit),
    ...row('cell', 'status', c.label, c.run?.status ?? 'deleted', ''),
  ]);
  if (verdict) {
    for (const v of verdict.rows) {
      const kind = figureKind(v.family);
      out.push(...row('verdict', `bits per char (${kind})`, v.model, v.bitsPerChar, BITS_PER_CHAR));
      out.push(...row('verdict', `bits per word (${kind})`, v.model, v.bitsPerWord, BITS_PER_WORD));
      out.push(...row('verdict', 'gap to the best n-gram', v.model, v.gapToNgramFloor, BITS_PER_CHAR));
    }
    for (const c of verdict.comparisons) {
      out.push(...row('verdict', 'SSM minus GRU', `state size ${c.stateSize}`, c.difference, BITS_PER_CHAR));
      out.push(...row('verdict', 'on par with the GRU', `state size ${c.stateSize}; tolerance ${verdict.toleranceBits}`, c.onPar === null ? null : c.onPar ? 'yes' : 'no', ''));
    }
  }
  return out;
}

// ---------------------------------------------------------------- CSV

/** Columns of the report CSV; the server writes it (server/http/csv.ts, with the spreadsheet-formula guard). */
export const REPORT_CSV_HEADER = ['section', 'name', 'setting', 'value', 'unit'] as const;
