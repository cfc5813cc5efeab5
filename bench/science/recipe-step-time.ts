/**
 * Step time of recipe-study arms, interleaved in one process (the machine may be shared: compare arms only within
 * one run): CPU ms per training step (process.cpuUsage), median over rounds, the arms' order alternating by round.
 * Each arm is `label` or `label:setting=value,setting=value` with the settings of recipe-study.ts (ArmSettings);
 * every arm starts from the study's starting point with observation scale 3 (flow width 32 unless named). Batches
 * of 64 names from the names union.
 *   npx tsx bench/science/recipe-step-time.ts --rounds 6 --steps 5 K8 K16:samples=16
 */
import { loadavg } from 'node:os';
import { parseArgs } from 'node:util';
import { createBatcher } from '../../shared/data/batcher';
import { encodeBatch } from '../../shared/data/encode';
import { createRng } from '../../shared/data/random';
import { StateSpaceModel } from '../../shared/model/ssm';
import { SsmTrainer } from '../../shared/model/trainer';
import { initNodeBackend } from '../../shared/node/tf-node';
import { loadCorpus } from '../../shared/cli/corpus-file';
import { buildCorpora } from './science-corpora';
import { applyRecipeInit, STUDY_START, type ArmSettings } from './recipe-arms';
import { printInterleaved, timeInterleaved } from '../interleaved-cpu';

const { values, positionals } = parseArgs({ allowPositionals: true, options: { rounds: { type: 'string' }, steps: { type: 'string' } } });
const rounds = Number(values.rounds ?? 6);
const steps = Number(values.steps ?? 5);

await initNodeBackend('wasm');
const { corpora, cleanUp } = buildCorpora(process.cwd());
const data = loadCorpus(corpora.find((c) => c.key === 'names')!.file, { splitSeed: 1, shares: { train: 0.8, validation: 0.1, test: 0.1 } });
cleanUp();
const batcher = createBatcher(data.parts.train, { batchSize: 64, regime: 'token', rng: createRng(1).fork('batches/0') });
const batches = Array.from({ length: 16 }, () => encodeBatch(batcher.next(), data.alphabet));

function makeArm(spec: string): { label: string; step: () => void } {
  const [label, list] = spec.split(':') as [string, string | undefined];
  const arm: ArmSettings = { ...STUDY_START, observationScale: 3, totalSteps: 1 };
  for (const p of list ? list.split(',') : []) {
    const [key, value] = p.split('=');
    if (!key || value === undefined || !(key in arm)) throw new Error(`Unknown setting ${p}`);
    const cur = (arm as unknown as Record<string, unknown>)[key];
    (arm as unknown as Record<string, unknown>)[key] = typeof cur === 'number' ? Number(value) : value;
  }
  const model = new StateSpaceModel({
    stateSize: arm.stateSize, vocabSize: data.alphabet.size,
    generativeFlow: arm.generativeFlow.split(',').map((kind) => ({ kind })) as never, inferenceFlow: arm.inferenceFlow.split(',').map((kind) => ({ kind })) as never,
    flowHidden: arm.flowHidden, observationHidden: arm.observationHidden, embeddingSize: arm.embeddingSize, encoderSize: arm.encoderSize,
    proposalHidden: arm.proposalHidden,
  }, 1);
  applyRecipeInit(model, arm);
  const trainer = new SsmTrainer(model, { learningRate: arm.learningRate, samples: arm.samples, clipNorm: arm.clipNorm, warmupSteps: arm.warmupSteps });
  let i = 0;
  return { label, step: () => void trainer.step(batches[i++ % batches.length]!) };
}

const arms = positionals.map(makeArm);
for (const a of arms) for (let w = 0; w < 2; w++) a.step();
const load0 = loadavg();
const cpu = timeInterleaved(arms, rounds, steps);
printInterleaved(arms, cpu, load0, `${rounds} rounds x ${steps} steps`);
