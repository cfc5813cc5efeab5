/** Command-line options of `npm run evaluate`. */
import { parseArgs } from 'node:util';
import { defaultEvaluationSettings, type EvaluationSettings } from '../eval/evaluation-report';

export interface EvaluateOptions {
  checkpoint: string;
  corpus: string;
  json: boolean;
  gruBaseline: string | null;
  ngramOrder: number;
  /** Split settings; null = the ones the checkpoint records (else 1 and 0.8,0.1,0.1). */
  splitSeed: number | null;
  shares: { train: number; validation: number; test: number } | null;
  heldOutSplit: 'validation' | 'test';
  /** Score the words of this file instead of a split of the corpus. */
  heldOutFile: string | null;
  /** Write one JSON line per scored word to this file. */
  perWord: string | null;
  backend: 'wasm' | 'cpu';
  /** null = as the checkpoint records (else lower-case). */
  keepCase: boolean | null;
  settings: EvaluationSettings;
}

export const EVALUATE_HELP = `Every evaluation figure of a checkpoint (MODEL.md section 7), in bits.

Usage: npm run evaluate -- <checkpoint> --corpus <file> [options]

Figures are positive costs: bits per word, and bits per character with the end-of-word symbol counted.
Error bars are standard errors from the per-word spread and the repeats.

  --corpus <file>          the corpus the model was trained on                            (required)
  --split <a,b,c>          train,validation,test shares       (as recorded in the checkpoint, else 0.8,0.1,0.1)
  --split-seed <n>         split seed                         (as recorded in the checkpoint, else 1)
  --held-out validation|test   which split to score                                      (test)
  --held-out-file <file>   score the words of this file (same format) instead of a split
  --keep-case              do not lower-case words            (as recorded in the checkpoint)
  --baseline <checkpoint>  a GRU checkpoint trained on the same corpus: its figures go beside the model's
  --order <n>              order of the Kneser–Ney baseline, fitted on exactly the model's
                           training words                                                (3)
  -k, --k <K>              K of the tight estimate                                       (256)
  --repeats <R>            repeats of the tight estimate (its spread)                    (3)
  --trajectories <S>       prior trajectories for the sequence cross entropy            (1024)
  --ce-k <K>               K of its second (IWAE) estimate, 0 = skip                      (16)
  --draws <M>              noise draws per step for the mutual information               (64)
  --detail-words <n>       held-out words used for noise and entropy figures              (100)
  --max-held-out <n>       score at most n held-out words: a hash-random subset (the same for
                           every model at one --seed); 0 = every held-out word            (0)
  --samples <n>            ancestral samples                                             (1000)
  --tmax <n>               longest sample / completion in steps                          (24)
  --particles <N>          particles of the completion filter                            (512)
  --prefix <text>          a prefix to complete (repeat the option for more)
  --seed <n>               seed of every estimate                                        (1)
  --backend wasm|cpu       TF.js backend                                                 (wasm)
  --per-word <file>        write one JSON line per scored word (bits, bits/char, baselines)
  --json                   print the full result as JSON instead of the table
  -h, --help               this text
Generated words and completions can coincide with real names or trademarks; corpora may hold personal names.
`;

function int(text: string | undefined, name: string, fallback: number, min: number): number {
  if (text === undefined) return fallback;
  const n = Number(text);
  if (text.trim() === '' || !Number.isInteger(n) || n < min) throw new Error(`--${name} must be a whole number ≥ ${min} (got "${text}").`);
  return n;
}

export function parseEvaluateArgs(argv: string[]): EvaluateOptions | null {
  const { values: v, positionals } = parseArgs({
    args: argv, allowPositionals: true, strict: true,
    options: {
      corpus: { type: 'string' }, split: { type: 'string' }, 'split-seed': { type: 'string' }, 'held-out': { type: 'string' },
      'keep-case': { type: 'boolean' }, 'held-out-file': { type: 'string' }, 'per-word': { type: 'string' }, baseline: { type: 'string' }, order: { type: 'string' }, k: { type: 'string', short: 'k' },
      repeats: { type: 'string' }, trajectories: { type: 'string' }, 'ce-k': { type: 'string' }, draws: { type: 'string' },
      'detail-words': { type: 'string' }, 'max-held-out': { type: 'string' }, samples: { type: 'string' }, tmax: { type: 'string' },
      particles: { type: 'string' }, prefix: { type: 'string', multiple: true }, seed: { type: 'string' },
      backend: { type: 'string' }, json: { type: 'boolean' }, help: { type: 'boolean', short: 'h' },
    },
  });
  if (v.help) return null;
  if (positionals.length !== 1) throw new Error('Give exactly one checkpoint file (see --help).');
  if (!v.corpus) throw new Error('Give the corpus with --corpus <file>; the figures need its words and counts.');
  const shares = v.split === undefined ? null : v.split.split(',').map(Number);
  if (shares && (shares.length !== 3 || shares.some((x) => !Number.isFinite(x) || x < 0))) throw new Error(`--split must be three shares like 0.8,0.1,0.1 (got "${v.split}").`);
  const heldOutSplit = (v['held-out'] ?? 'test') as 'validation' | 'test';
  if (heldOutSplit !== 'validation' && heldOutSplit !== 'test') throw new Error(`--held-out must be validation or test (got "${v['held-out']}").`);
  const backend = (v.backend ?? 'wasm') as 'wasm' | 'cpu';
  if (backend !== 'wasm' && backend !== 'cpu') throw new Error(`--backend must be wasm or cpu (got "${v.backend}").`);
  const d = defaultEvaluationSettings;
  const draws = int(v.draws, 'draws', d.noiseDraws, 2);
  return {
    checkpoint: positionals[0] as string, corpus: v.corpus, json: v.json ?? false, gruBaseline: v.baseline ?? null,
    ngramOrder: int(v.order, 'order', 3, 1),
    splitSeed: v['split-seed'] === undefined ? null : int(v['split-seed'], 'split-seed', 1, 0),
    shares: shares ? { train: shares[0] as number, validation: shares[1] as number, test: shares[2] as number } : null,
    heldOutSplit, heldOutFile: v['held-out-file'] ?? null, perWord: v['per-word'] ?? null,
    backend, keepCase: v['keep-case'] ?? null,
    settings: {
      tightK: int(v.k, 'k', d.tightK, 1), repeats: int(v.repeats, 'repeats', d.repeats, 1),
      trajectories: int(v.trajectories, 'trajectories', d.trajectories, 1), crossEntropyK: int(v['ce-k'], 'ce-k', d.crossEntropyK, 0),
      noiseDraws: draws, detailWords: int(v['detail-words'], 'detail-words', d.detailWords, 1),
      samples: int(v.samples, 'samples', d.samples, 1), tMax: int(v.tmax, 'tmax', d.tMax, 2),
      particles: int(v.particles, 'particles', d.particles, 1), prefixes: v.prefix ?? [],
      maxHeldOut: int(v['max-held-out'], 'max-held-out', 0, 0), seed: int(v.seed, 'seed', d.seed, 0),
    },
  };
}
