/** Command-line options of `npm run train` (every run setting), parsed with node:util's parseArgs. */
import { parseArgs } from 'node:util';
import { validateFlowSpec, type FlowSpec } from '../model/flows/flow';
import { FLOW_KIND_NAMES, isKnDiscount, isObservationInitScale, KN_DISCOUNT_RANGE, MODEL_FAMILIES, NEW_RUN_MODEL_DEFAULTS as D, NEW_RUN_TRAINING_DEFAULTS as T, OBSERVATION_INIT_SCALE_RANGE, SETTING_LIMITS, withinLimit, type LimitedSetting, type ModelFamilyName } from '../model/settings-rules';

export type ModelKind = ModelFamilyName;

export interface TrainOptions {
  corpus: string;
  model: ModelKind;
  outDir: string;
  steps: number;
  batchSize: number;
  regime: 'token' | 'type';
  learningRate: number;
  clipNorm: number;
  samples: number;
  warmupSteps: number;
  /** SSM: initial observation weights × this (a fresh run only). */
  observationInitScale: number;
  stateSize: number;
  generativeFlow: FlowSpec[];
  inferenceFlow: FlowSpec[];
  flowHidden: number;
  observationHidden: number;
  embeddingSize: number;
  encoderSize: number;
  proposalHidden: number;
  order: number;
  discount: number | null;
  seed: number;
  splitSeed: number;
  shares: { train: number; validation: number; test: number };
  evalEvery: number;
  evalK: number;
  checkpointEvery: number;
  backend: 'wasm' | 'cpu';
  resume: string | null;
  keepCase: boolean;
  allowedChars: string | null;
  /** Held-out words for the validation figures from a file; the corpus is then not split unless --split is given. */
  validationFile: string | null;
  quiet: boolean;
}

export const TRAIN_HELP = `Train a model on a word corpus (headless; the same model code as the browser).

Usage: npm run train -- --corpus <file> [options]

Corpus
  --corpus <file>            .txt (one word a line) or .tsv/.csv (word, count)     (required)
  --keep-case                do not lower-case words
  --allowed-chars <chars>    drop words with characters outside this list
  --split <a,b,c>            train,validation,test shares                           (0.8,0.1,0.1)
  --split-seed <n>           seed of the deterministic split                        (1)
  --validation-file <file>   validation words from this file (same format); the corpus is
                             then used whole for training unless --split is given
Model
  --model ssm|gru|ngram      stochastic state-space model, GRU baseline, KN n-gram  (ssm)
  --state-size <d>           state (and noise) size; also the GRU's state size      (${D.stateSize})
  --gen-flow <list>          generative flow layers, e.g. coupling,coupling,diag    (${D.generativeFlow.join(',')})
  --inf-flow <list>          inference flow layers (${FLOW_KIND_NAMES.join(', ')})    (${D.inferenceFlow.join(',')})
  --flow-hidden <n>          width of the flows' conditioning networks               (${D.flowHidden})
  --obs-hidden <n>           observation MLP width, 0 = linear                       (${D.observationHidden})
  --embedding <n>            character embedding size (inference network / GRU)      (${D.embeddingSize})
  --encoder <n>              backward GRU width of the inference network            (${D.encoderSize})
  --proposal-hidden <n>      proposal MLP width                                      (${D.proposalHidden})
  --order <n>                n-gram order ${SETTING_LIMITS.ngramOrder.join('-')}                                        (${D.ngramOrder})
  --discount <D>             fixed KN discount in (0, 1]; default: modified KN
Training
  --steps <n>                optimisation steps                                      (${T.steps})
  --batch-size <n>           words per batch                                         (${T.batchSize})
  --regime token|type        sample words by count or each type equally             (token)
  --learning-rate <x>        Adam step size                                          (${T.learningRate})
  --clip-norm <x>            global gradient-norm clipping, 0 = off                  (${T.clipNorm})
  -k, --samples <K>          importance samples per word (IWAE bound)                (${D.samples})
  --warmup-steps <n>         warm-up of the prior/posterior terms (not a bound meanwhile) (${T.warmupSteps})
  --obs-init-scale <x>       SSM: initial observation weights × x, 1 = as built; a new
                             run only (${OBSERVATION_INIT_SCALE_RANGE.join(' to ')})                         (${T.observationInitScale})
  --seed <n>                 seed of weights, batches and noise                      (1)
  --eval-every <n>           validation figure every n steps, 0 = only at the end    (200)
                             (on a hash-random subset of at most 200 validation words, the
                             same for every run of the corpus)
  --eval-k <K>               K of the validation bound                               (64)
  --checkpoint-every <n>     also save the checkpoint every n steps, 0 = at the end  (0)
  --resume <checkpoint>      continue a run from its checkpoint (same settings)
  --backend wasm|cpu         TF.js backend                                           (wasm)
Output
  --out <dir>                folder for checkpoint.nwck and metrics.json             (runs/<model>-<time>)
  --quiet                    no progress bar
  -h, --help                 this text
`;

const flowList = (text: string, what: string): FlowSpec[] => {
  const spec = text.split(',').map((s) => ({ kind: s.trim() })) as unknown[];
  const [lo, hi] = SETTING_LIMITS.flowLayers;
  if (spec.length < lo || spec.length > hi) throw new Error(`The ${what} must have ${lo} to ${hi} layers (got ${spec.length}).`);
  validateFlowSpec(spec, what);
  return spec;
};

function num(text: string | undefined, name: string, fallback: number, check: (n: number) => boolean, rule: string): number {
  if (text === undefined) return fallback;
  const n = Number(text);
  if (text.trim() === '' || !Number.isFinite(n) || !check(n)) throw new Error(`--${name} must be ${rule} (got "${text}").`);
  return n;
}
const whole = (min: number) => (n: number) => Number.isInteger(n) && n >= min;
/** A model setting with its limits from shared/model/settings-rules.ts. */
function limited(text: string | undefined, name: string, key: LimitedSetting, fallback: number): number {
  const [lo, hi] = SETTING_LIMITS[key];
  return num(text, name, fallback, (n) => withinLimit(key, n), `a whole number from ${lo} to ${hi}`);
}

/** Parses argv (without node and script). Returns null when help was asked for. */
export function parseTrainArgs(argv: string[]): TrainOptions | null {
  const { values: v } = parseArgs({
    args: argv, allowPositionals: false, strict: true,
    options: {
      corpus: { type: 'string' }, model: { type: 'string' }, out: { type: 'string' }, steps: { type: 'string' },
      'batch-size': { type: 'string' }, regime: { type: 'string' }, 'learning-rate': { type: 'string' },
      'clip-norm': { type: 'string' }, samples: { type: 'string', short: 'k' }, 'warmup-steps': { type: 'string' }, 'obs-init-scale': { type: 'string' },
      'state-size': { type: 'string' }, 'gen-flow': { type: 'string' }, 'inf-flow': { type: 'string' },
      'flow-hidden': { type: 'string' }, 'obs-hidden': { type: 'string' }, embedding: { type: 'string' },
      encoder: { type: 'string' }, 'proposal-hidden': { type: 'string' }, order: { type: 'string' },
      discount: { type: 'string' }, seed: { type: 'string' }, 'split-seed': { type: 'string' }, split: { type: 'string' },
      'eval-every': { type: 'string' }, 'eval-k': { type: 'string' }, 'checkpoint-every': { type: 'string' },
      backend: { type: 'string' }, resume: { type: 'string' }, 'keep-case': { type: 'boolean' },
      'allowed-chars': { type: 'string' }, 'validation-file': { type: 'string' }, quiet: { type: 'boolean' }, help: { type: 'boolean', short: 'h' },
    },
  });
  if (v.help) return null;
  if (!v.corpus) throw new Error('Give the corpus file with --corpus <file> (see --help).');
  const model = (v.model ?? 'ssm') as ModelKind;
  if (!(MODEL_FAMILIES as readonly string[]).includes(model)) throw new Error(`--model must be one of ${MODEL_FAMILIES.join(', ')} (got "${v.model}").`);
  const regime = (v.regime ?? 'token') as 'token' | 'type';
  if (regime !== 'token' && regime !== 'type') throw new Error(`--regime must be token or type (got "${v.regime}").`);
  const backend = (v.backend ?? 'wasm') as 'wasm' | 'cpu';
  if (backend !== 'wasm' && backend !== 'cpu') throw new Error(`--backend must be wasm or cpu (got "${v.backend}").`);
  const shareParts = (v.split ?? (v['validation-file'] ? '1,0,0' : '0.8,0.1,0.1')).split(',').map(Number);
  if (shareParts.length !== 3 || shareParts.some((x) => !Number.isFinite(x) || x < 0)) {
    throw new Error(`--split must be three shares like 0.8,0.1,0.1 (got "${v.split}").`);
  }
  const [train, validation, test] = shareParts as [number, number, number];
  const pos = (n: number) => n > 0;
  return {
    corpus: v.corpus, model, regime, backend,
    outDir: v.out ?? `runs/${model}-${new Date().toISOString().replace(/[:.]/g, '-')}`,
    steps: num(v.steps, 'steps', T.steps, whole(0), 'a whole number ≥ 0'),
    batchSize: num(v['batch-size'], 'batch-size', T.batchSize, whole(1), 'a whole number ≥ 1'),
    learningRate: num(v['learning-rate'], 'learning-rate', T.learningRate, pos, 'a positive number'),
    clipNorm: num(v['clip-norm'], 'clip-norm', T.clipNorm, (n) => n >= 0, '0 or a positive number'),
    samples: limited(v.samples, 'samples', 'samples', D.samples),
    warmupSteps: num(v['warmup-steps'], 'warmup-steps', T.warmupSteps, whole(0), 'a whole number ≥ 0'),
    observationInitScale: num(v['obs-init-scale'], 'obs-init-scale', T.observationInitScale, isObservationInitScale,
      `a number from ${OBSERVATION_INIT_SCALE_RANGE[0]} to ${OBSERVATION_INIT_SCALE_RANGE[1]}`),
    stateSize: limited(v['state-size'], 'state-size', 'stateSize', D.stateSize),
    generativeFlow: flowList(v['gen-flow'] ?? D.generativeFlow.join(','), 'generative flow (--gen-flow)'),
    inferenceFlow: flowList(v['inf-flow'] ?? D.inferenceFlow.join(','), 'inference flow (--inf-flow)'),
    flowHidden: limited(v['flow-hidden'], 'flow-hidden', 'flowHidden', D.flowHidden),
    observationHidden: limited(v['obs-hidden'], 'obs-hidden', 'observationHidden', D.observationHidden),
    embeddingSize: limited(v.embedding, 'embedding', 'embeddingSize', D.embeddingSize),
    encoderSize: limited(v.encoder, 'encoder', 'encoderSize', D.encoderSize),
    proposalHidden: limited(v['proposal-hidden'], 'proposal-hidden', 'proposalHidden', D.proposalHidden),
    order: limited(v.order, 'order', 'ngramOrder', D.ngramOrder),
    discount: v.discount === undefined ? null : num(v.discount, 'discount', 0.75, isKnDiscount, `a number in ${KN_DISCOUNT_RANGE.text}`),
    seed: num(v.seed, 'seed', 1, Number.isInteger, 'a whole number'),
    splitSeed: num(v['split-seed'], 'split-seed', 1, Number.isInteger, 'a whole number'),
    shares: { train, validation, test },
    evalEvery: num(v['eval-every'], 'eval-every', 200, whole(0), 'a whole number ≥ 0'),
    evalK: num(v['eval-k'], 'eval-k', 64, whole(1), 'a whole number ≥ 1'),
    checkpointEvery: num(v['checkpoint-every'], 'checkpoint-every', 0, whole(0), 'a whole number ≥ 0'),
    resume: v.resume ?? null,
    keepCase: v['keep-case'] ?? false,
    allowedChars: v['allowed-chars'] ?? null,
    validationFile: v['validation-file'] ?? null,
    quiet: v.quiet ?? false,
  };
}
