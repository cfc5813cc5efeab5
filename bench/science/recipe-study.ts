/**
 * One arm of the training-recipe study (docs/RESULTS.md, "Training recipe study"): trains a state-space model on
 * the names union (the product's split, seed 1, 0.8/0.1/0.1) with the given settings, then scores every test word
 * with the IWAE bound (K and repeats as given) and measures the noise MI and observation entropy on 100 test words.
 * Appends one JSON line to the results file. Usage:
 *   npx tsx bench/science/recipe-study.ts --label <name> [--steps 800] [--seed 1] [--out file.jsonl] [setting=value ...]
 * Settings are the fields of `ArmSettings` (recipe-arms.ts); an unnamed one keeps the study's starting point
 * `STUDY_START` there (the model defaults as the study began, flow width 32, Adam at a constant 0.01, clipping 5,
 * `observationScale` 1). Training follows the
 * product's engine: the same batch stream and per-step noise seeds as `npm run train` with the same seed.
 */
import { appendFileSync } from 'node:fs';
import * as tf from '@tensorflow/tfjs-core';
import { parseArgs } from 'node:util';
import { createBatcher } from '../../shared/data/batcher';
import { encodeBatch } from '../../shared/data/encode';
import { createRng } from '../../shared/data/random';
import { heldOutSample } from '../../shared/eval/evaluation-report';
import { noiseInformation } from '../../shared/eval/noise-information';
import { ssmObservationEntropy } from '../../shared/eval/observation-entropy';
import { tightEstimate } from '../../shared/eval/tight-estimate';
import { StateSpaceModel } from '../../shared/model/ssm';
import { SsmTrainer } from '../../shared/model/trainer';
import { initNodeBackend } from '../../shared/node/tf-node';
import { loadCorpus } from '../../shared/cli/corpus-file';
import { buildCorpora } from './science-corpora';
import { applyRecipeInit, initialStateValues, scaleContextWeights, learningRateAt, STUDY_START, type ArmSettings } from './recipe-arms';

const { values: v, positionals } = parseArgs({
  allowPositionals: true,
  options: { label: { type: 'string' }, steps: { type: 'string' }, seed: { type: 'string' }, out: { type: 'string' },
    k: { type: 'string' }, repeats: { type: 'string' } },
});
const steps = Number(v.steps ?? 800);
const seed = Number(v.seed ?? 1);
const evalK = Number(v.k ?? 256);
const repeats = Number(v.repeats ?? 1);
const arm: ArmSettings = { ...STUDY_START, totalSteps: steps };
for (const p of positionals) {
  const [key, value] = p.split('=');
  if (!key || value === undefined || !(key in arm)) throw new Error(`Unknown setting ${p}`);
  const cur = (arm as unknown as Record<string, unknown>)[key];
  (arm as unknown as Record<string, unknown>)[key] = typeof cur === 'number' ? Number(value) : value;
}

await initNodeBackend('wasm');
const { corpora, cleanUp } = buildCorpora(process.cwd());
const names = corpora.find((c) => c.key === 'names')!;
const data = loadCorpus(names.file, { splitSeed: 1, shares: { train: 0.8, validation: 0.1, test: 0.1 } });
cleanUp();
const alphabet = data.alphabet;
const model = new StateSpaceModel({
  stateSize: arm.stateSize, vocabSize: alphabet.size,
  generativeFlow: arm.generativeFlow.split(',').map((kind) => ({ kind })) as never, inferenceFlow: arm.inferenceFlow.split(',').map((kind) => ({ kind })) as never,
  flowHidden: arm.flowHidden, observationHidden: arm.observationHidden, embeddingSize: arm.embeddingSize, encoderSize: arm.encoderSize,
  proposalHidden: arm.proposalHidden,
}, seed);
applyRecipeInit(model, arm);
scaleContextWeights(model, arm.contextGain);
// The initial-state arms: h0 drawn at the start and/or held fixed (set back after every update).
const h0Values = initialStateValues(arm, arm.stateSize, seed);
const h0Fixed = h0Values && !arm.h0Learned ? tf.keep(tf.tensor1d(h0Values)) : null;
if (h0Values) model.param('h0').assign(tf.tensor1d(h0Values));
const trainer = new SsmTrainer(model, { learningRate: arm.learningRate, samples: arm.samples, clipNorm: arm.clipNorm, warmupSteps: arm.warmupSteps });
const batcher = createBatcher(data.parts.train, { batchSize: arm.batchSize, regime: 'token', rng: createRng(seed).fork('batches/0') });
const t0 = performance.now();
const curve: number[] = [];
let window = 0;
for (let s = 0; s < steps; s++) {
  trainer.learningRate = learningRateAt(arm, s);
  const r = trainer.step(encodeBatch(batcher.next(), alphabet));
  if (h0Fixed) model.param('h0').assign(h0Fixed);
  window += -r.boundBitsPerChar;
  if ((s + 1) % 100 === 0) {
    curve.push(Number((window / 100).toFixed(3)));
    window = 0;
    process.stderr.write(`step ${s + 1}: ${curve.at(-1)} bits/char, ${((performance.now() - t0) / (s + 1)).toFixed(0)} ms/step\n`);
  }
}
const trainSeconds = (performance.now() - t0) / 1000;
const words = heldOutSample(data.parts.test, 0, 1);
const t1 = performance.now();
const tight = tightEstimate(model, words, alphabet, { k: evalK, repeats, seed: 1 });
const detail = words.slice(0, 100);
const mi = noiseInformation(model, detail, alphabet, { draws: 64, seed: 1 });
const ent = ssmObservationEntropy(model, detail, alphabet, { seed: 1 });
const row = {
  label: v.label ?? 'arm', steps, seed, arm, trainSeconds: Number(trainSeconds.toFixed(1)), msPerStep: Number((1000 * trainSeconds / steps).toFixed(1)),
  evalSeconds: Number(((performance.now() - t1) / 1000).toFixed(1)), evalK, repeats, words: words.length,
  heldOutBitsPerChar: Number(tight.bitsPerChar.toFixed(4)), heldOutBitsPerWord: Number(tight.bitsPerWord.toFixed(3)),
  se: Number((tight.standardError.bitsPerChar.total ?? NaN).toFixed(4)),
  miBitsPerStep: Number(mi.meanBits.toFixed(3)), miFirst: Number((mi.perPosition[0]?.mean ?? 0).toFixed(3)),
  miByPosition: mi.perPosition.filter((p) => p.n >= 5).map((p) => Number(p.mean.toFixed(2))),
  observationEntropyBits: Number(ent.meanBits.toFixed(3)), trainCurve: curve,
};
appendFileSync(v.out ?? 'recipe-study.jsonl', `${JSON.stringify(row)}\n`);
// Per-word bits (same words, same order for every arm): paired differences between arms.
appendFileSync(`${v.out ?? 'recipe-study.jsonl'}.words`, `${JSON.stringify({ label: row.label, bits: tight.perWord.map((w) => Number((-w.logP / Math.LN2).toFixed(4))) })}\n`);
console.log(JSON.stringify(row));
