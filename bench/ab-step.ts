/**
 * A/B timing of the reference training step, interleaved in one process (the machine may be shared: compare
 * variants only within one run). Each variant is "<tree>:<kernels>": tree `new` (this checkout) or `base`
 * (a copy of an older `shared/` under --base <dir>), kernels a '+'-list of step kernels to enable (mm, tanh,
 * identity, concat) or `stock`. Reports CPU ms per step (process.cpuUsage) and kernels per step (tf.profile).
 *   npx tsx bench/ab-step.ts --base /tmp/base --rounds 6 --steps 4 base:stock new:stock new:mm+tanh+identity
 */
import { readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import * as tf from '@tensorflow/tfjs-core';
import '@tensorflow/tfjs-backend-wasm';
import { BatchMatMul, Concat, Identity, Tanh, getKernel, registerKernel, unregisterKernel, type KernelConfig } from '@tensorflow/tfjs-core';
import { createBatcher } from '../shared/data/batcher';
import { parseCorpus } from '../shared/data/corpus-parse';
import { buildAlphabet, encodeBatch } from '../shared/data/encode';
import { createRng } from '../shared/data/random';
import { printInterleaved, timeInterleaved } from './interleaved-cpu';

const { values, positionals } = parseArgs({
  allowPositionals: true,
  options: { gru: { type: 'boolean' }, base: { type: 'string' }, rounds: { type: 'string' }, steps: { type: 'string' }, state: { type: 'string' }, k: { type: 'string' } },
});
const rounds = Number(values.rounds ?? 6);
const steps = Number(values.steps ?? 4);
const stateSize = Number(values.state ?? 8);
const K = Number(values.k ?? 8);
const names = { mm: BatchMatMul, tanh: Tanh, identity: Identity, concat: Concat } as const;
const stockCfg = Object.fromEntries(Object.entries(names).map(([k, n]) => [k, getKernel(n, 'wasm')!])) as Record<string, KernelConfig>;
const { initNodeBackend } = await import('../shared/node/tf-node');
await initNodeBackend('wasm');
const fastCfg = Object.fromEntries(Object.entries(names).map(([k, n]) => [k, getKernel(n, 'wasm')!])) as Record<string, KernelConfig>;
function useKernels(list: string[]) {
  for (const k of Object.keys(names)) {
    unregisterKernel(stockCfg[k]!.kernelName, 'wasm');
    registerKernel(list.includes(k) ? fastCfg[k]! : stockCfg[k]!);
  }
}

const root = resolve(import.meta.dirname, '..');
const parsed = parseCorpus(new Uint8Array(readFileSync(join(root, 'datasets-demo/archipelago-places.tsv'))), { fileName: 'a.tsv' });
if (!parsed.ok) throw new Error('corpus');
const alphabet = buildAlphabet(parsed.words.map((w) => w.word));
const batcher = createBatcher(parsed.words, { batchSize: 64, regime: 'token', rng: createRng(1) });
const batches = Array.from({ length: 16 }, () => encodeBatch(batcher.next(), alphabet));

interface Variant { label: string; kernels: string[]; step: () => number; }
async function makeVariant(spec: string): Promise<Variant> {
  const [tree, ks] = spec.split(':') as [string, string];
  const dir = tree === 'new' ? join(root, 'shared') : tree === 'base' ? resolve(values.base ?? '') + '/shared' : resolve(tree) + '/shared';
  if (values.gru) {
    const { GruLanguageModel, GruTrainer } = await import(join(dir, 'model/gru-lm.ts'));
    const gru = new GruLanguageModel({ vocabSize: alphabet.size, stateSize, embeddingSize: 16, observationHidden: 0 }, 1);
    const gt = new GruTrainer(gru, { learningRate: 0.01, clipNorm: 5 });
    let j = 0;
    return { label: spec, kernels: ks === 'stock' ? [] : ks.split('+'), step: () => gt.step(batches[j++ % batches.length]!).loss };
  }
  const { StateSpaceModel } = await import(join(dir, 'model/ssm.ts'));
  const { defaultSsmSettings } = await import(join(dir, 'model/ssm-settings.ts'));
  const { SsmTrainer } = await import(join(dir, 'model/trainer.ts'));
  const model = new StateSpaceModel(defaultSsmSettings(alphabet.size, {
    stateSize, generativeFlow: [{ kind: 'coupling' }, { kind: 'coupling' }, { kind: 'diag' }], inferenceFlow: [{ kind: 'diag' }], encoderSize: 64,
  }), 1);
  const trainer = new SsmTrainer(model, { learningRate: 0.01, samples: K, clipNorm: 5 });
  let i = 0;
  return { label: spec, kernels: ks === 'stock' ? [] : ks.split('+'), step: () => trainer.step(batches[i++ % batches.length]!, 1000 + i).loss };
}

const variants: Variant[] = [];
for (const s of positionals) variants.push(await makeVariant(s));
const kernels: number[] = [];
const load0 = loadavg();
for (const [vi, v] of variants.entries()) {
  useKernels(v.kernels);
  for (let w = 0; w < 2; w++) v.step();
  kernels[vi] = (await tf.profile(() => { v.step(); })).kernels.length;
}
const timed = variants.map((v) => ({ label: v.label, step: v.step, before: () => useKernels(v.kernels) }));
const cpu = timeInterleaved(timed, rounds, steps);
printInterleaved(timed, cpu, load0, `state ${stateSize}, K ${K}; ${rounds} rounds x ${steps} steps`, (i) => `  kernels ${kernels[i]}`);
