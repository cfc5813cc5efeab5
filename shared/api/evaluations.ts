/**
 * Stored evaluations of a checkpoint: the request schema (settings + the figures computed in the browser's
 * evaluation worker or by `npm run evaluate`) and the answer types of
 * `/api/benches/:benchId/runs/:runId/checkpoints/:checkpointId/evaluations` and `/api/benches/:benchId/evaluations`.
 * The results have the shape of `shared/eval/evaluation-report.ts` (`SsmEvaluation` | `ExactEvaluation`);
 * only types are imported from there, so this file pulls no model code into a page.
 */
import { z } from 'zod';
import { safeText } from './safe-text';
import type { EvaluationSettings, ExactEvaluation, SsmEvaluation } from '../eval/evaluation-report';

const whole = (name: string, min: number, max: number) =>
  z
    .number({ error: `Give ${name} as a number.` })
    .int(`Give ${name} as a whole number.`)
    .min(min, `Give ${name} of at least ${min}.`)
    .max(max, `Give ${name} of at most ${max}.`);

/** A finite number (JSON turns NaN and infinities into null, which fails here too). */
const fin = z.number({ error: 'Every figure must be a finite number.' }).refine(Number.isFinite, 'Every figure must be a finite number.');
const count = z.number().int().min(0);
const word = safeText().max(400);

/**
 * What the user chose for one evaluation. `K`, `repeats`: the tight held-out estimate; `S`: prior trajectories
 * of the sequence cross entropy (`crossEntropyK` its IWAE check, 0 = skip); `M`: noise draws; `sampleCount`:
 * sampled words; `baselineRunId`: a GRU run whose checkpoint gave the baseline figures (optional);
 * `heldOutSplit`: the split whose words are scored (`npm run evaluate --held-out`); `ngramOrder`: the order of the
 * Kneser–Ney baseline fitted on the training words (`--order`, 1–6 as shared/model/ngram-kn.ts allows).
 * Two evaluations with equal settings (after defaults) are the same evaluation (409 on the second).
 */
export const evaluationSettingsSchema = z
  .object({
    K: whole('K (importance samples of the tight estimate)', 1, 4096),
    repeats: whole('a number of repeats', 1, 32).default(3),
    S: whole('S (prior trajectories)', 1, 1_000_000).default(1024),
    crossEntropyK: whole('K of the cross-entropy check (0 = skip)', 0, 4096).default(16),
    M: whole('M (noise draws)', 2, 4096).default(64),
    sampleCount: whole('a number of samples', 1, 100_000).default(1000),
    detailWords: whole('a number of detail words', 1, 10_000).default(100),
    maxHeldOut: whole('a number of held-out words', 1, 1_000_000).default(500),
    tMax: whole('Tmax', 1, 200).default(24),
    particles: whole('a number of particles', 1, 100_000).default(512),
    prefixes: z.array(safeText().max(60, 'Keep each prefix to 60 characters.'), { error: 'Give prefixes as a list of strings.' })
      .max(20, 'Give at most 20 prefixes.').default([]),
    seed: whole('a seed', 0, 2 ** 31 - 1).default(1),
    baselineRunId: z.string().uuid('Choose a baseline run of this bench.').nullable().default(null),
    heldOutSplit: z.enum(['validation', 'test'], { error: 'Choose the held-out split: validation or test.' }).default('test'),
    ngramOrder: whole('the n-gram order', 1, 6).default(3),
  })
  .strict();
export type EvaluationSettingsInput = z.input<typeof evaluationSettingsSchema>;
export type StoredEvaluationSettings = z.output<typeof evaluationSettingsSchema>;

/** The settings in the form `evaluateSsm` / `evaluateExact` take (shared/eval/evaluation-report.ts). */
export function toReportSettings(s: StoredEvaluationSettings): EvaluationSettings {
  return {
    tightK: s.K, repeats: s.repeats, trajectories: s.S, crossEntropyK: s.crossEntropyK, noiseDraws: s.M,
    detailWords: s.detailWords, samples: s.sampleCount, tMax: s.tMax, particles: s.particles,
    prefixes: s.prefixes.slice(), maxHeldOut: s.maxHeldOut, seed: s.seed,
  };
}

/**
 * The settings added after the first evaluations were stored, with their defaults: a key leaves them out while
 * they hold the default, so an evaluation stored before they existed (held-out split test, order 3) still has
 * the key of the same settings sent today.
 */
const LATER_SETTING_DEFAULTS: Record<string, unknown> = { heldOutSplit: 'test', ngramOrder: 3 };

/** A canonical key of the settings (sorted keys), used to find an identical evaluation. */
export function evaluationSettingsKey(s: StoredEvaluationSettings): string {
  const r = s as Record<string, unknown>;
  const keep = (k: string) => !(k in LATER_SETTING_DEFAULTS) || (r[k] !== undefined && r[k] !== LATER_SETTING_DEFAULTS[k]);
  const sorted = Object.keys(s).filter(keep).sort().map((k) => [k, r[k]]);
  return JSON.stringify(sorted);
}

/** Standard errors (shared/eval/standard-error.ts); null where undefined (fewer than 2 words). Optional: older results lack them. */
const se = z.number().nullable();
const repeatErrorsSchema = z.object({ words: se, repeats: se, total: se });
const heldOutFiguresSchema = z.object({ bitsPerWord: fin, bitsPerChar: fin, words: count,
  standardError: z.object({ bitsPerWord: se, bitsPerChar: se }).optional() });
const crossEntropySchema = z.object({ crossEntropyBits: fin, dataEntropyBits: fin, klGapBits: fin, modelMass: fin });
const observationEntropySchema = z.object({ meanBits: fin, perWord: z.array(z.object({ word, bits: fin })) });

const baselinesSchema = z.object({
  unigram: heldOutFiguresSchema,
  ngram: heldOutFiguresSchema.extend({ order: count, crossEntropy: crossEntropySchema }).optional(),
  gru: heldOutFiguresSchema.extend({ crossEntropy: crossEntropySchema, predictiveEntropy: observationEntropySchema }).optional(),
});

const ssmResultsSchema = z.object({
  family: z.literal('ssm'),
  tight: z.object({
    k: count, repeats: count, bitsPerWord: fin, bitsPerChar: fin,
    repeatBitsPerWord: z.array(fin), repeatBitsPerChar: z.array(fin), stdBitsPerWord: fin, stdBitsPerChar: fin,
    standardError: z.object({ bitsPerWord: repeatErrorsSchema, bitsPerChar: repeatErrorsSchema }).optional(),
  }),
  crossEntropy: z.object({ shared: crossEntropySchema, iwae: crossEntropySchema.nullable(), samples: count, iwaeK: count }),
  noise: z.object({
    draws: count,
    perWord: z.array(z.object({ word, bits: z.array(fin) })),
    perPosition: z.array(z.object({ t: count, mean: fin, min: fin, q1: fin, median: fin, q3: fin, max: fin, n: count })),
    meanBits: fin,
    maxBits: fin,
  }),
  observationEntropy: observationEntropySchema,
  samples: z.object({
    count,
    shares: z.object({ train: fin, heldOut: fin, novel: fin }),
    lengthHistogram: z.object({ samples: z.array(fin), corpusTokens: z.array(fin), corpusTypes: z.array(fin) }),
    top: z.array(z.object({ word, count, source: z.enum(['train', 'held-out', 'novel']) })),
    truncated: count,
  }),
  completions: z.array(z.object({
    prefix: word,
    logPrefix: fin,
    effectiveSampleSize: fin,
    continuations: z.array(z.object({ word, continuation: word, weight: fin, ended: z.boolean() })),
    meanState: z.array(fin),
  })),
  noiseMap: z.object({
    dims: z.tuple([count, count]),
    from: z.array(fin),
    points: z.array(z.object({ noise: z.tuple([fin, fin]), state: z.tuple([fin, fin]), char: safeText().max(8).nullable(), prob: fin })),
  }).nullable(),
  baselines: baselinesSchema,
});

const exactResultsSchema = z.object({
  family: z.enum(['gru', 'ngram']),
  heldOut: heldOutFiguresSchema,
  crossEntropy: crossEntropySchema,
  predictiveEntropy: observationEntropySchema.optional(),
  baselines: baselinesSchema,
});

/** The figures of one evaluation, as produced by `evaluateSsm` / `evaluateExact`. */
export const evaluationResultsSchema = z.union([ssmResultsSchema, exactResultsSchema], {
  error: 'Send the results as produced by the evaluation (family ssm, gru or ngram, every figure a finite number).',
});
export type EvaluationResults = SsmEvaluation | ExactEvaluation;

/** `POST .../evaluations`. */
export const createEvaluationSchema = z
  .object({ settings: evaluationSettingsSchema, results: evaluationResultsSchema })
  .strict();
export type CreateEvaluationRequest = z.input<typeof createEvaluationSchema>;

/** The headline figures of an evaluation (for lists): held-out bits per char and word, and the cross entropy. */
export interface EvaluationHeadline {
  bitsPerChar: number;
  bitsPerWord: number;
  crossEntropyBits: number;
}

export function evaluationHeadline(r: EvaluationResults): EvaluationHeadline {
  if (r.family === 'ssm') {
    return { bitsPerChar: r.tight.bitsPerChar, bitsPerWord: r.tight.bitsPerWord, crossEntropyBits: r.crossEntropy.shared.crossEntropyBits };
  }
  return { bitsPerChar: r.heldOut.bitsPerChar, bitsPerWord: r.heldOut.bitsPerWord, crossEntropyBits: r.crossEntropy.crossEntropyBits };
}

/** One stored evaluation without its results (lists). */
export interface EvaluationSummaryDto {
  id: string;
  benchId: string;
  run: { id: string; name: string; family: 'ssm' | 'gru' | 'ngram' };
  checkpoint: { id: string; step: number };
  createdBy: { id: string; displayName: string } | null;
  settings: StoredEvaluationSettings;
  headline: EvaluationHeadline;
  createdAt: string;
}

/** One stored evaluation with every figure. */
export interface EvaluationDto extends EvaluationSummaryDto {
  results: EvaluationResults;
}

/** `GET /benches/:benchId/evaluations?runId=&limit=&offset=`. */
export const listEvaluationsQuerySchema = z.object({
  runId: z.string().uuid('Choose a run of this bench.').optional(),
  limit: z.coerce.number({ error: 'Give limit as a whole number.' }).int('Give limit as a whole number.').min(1, 'Give a limit of at least 1.').max(200, 'Give a limit of at most 200.').default(50),
  offset: z.coerce.number({ error: 'Give offset as a whole number.' }).int('Give offset as a whole number.').min(0, 'Give an offset of 0 or more.').default(0),
});

export interface EvaluationPage {
  items: EvaluationSummaryDto[];
  total: number;
}

/** The 409 answer of `POST .../evaluations` when the same settings were evaluated already. */
export interface EvaluationExistsBody {
  error: { code: 'EVALUATION_EXISTS'; message: string; existing: EvaluationDto };
}
