/** Profile of the reference training step: CPU ms/step and kernels per step by kernel name (tf.profile). `npx tsx bench/step-profile.ts` (STEPS=n, MM=1 for matmul shapes, SHAPES=Sum,Tile for the input shapes of those kernels). */
import * as tf from '@tensorflow/tfjs-core';
import { readFileSync } from 'node:fs';
import { createBatcher } from '../shared/data/batcher';
import { parseCorpus } from '../shared/data/corpus-parse';
import { buildAlphabet, encodeBatch } from '../shared/data/encode';
import { createRng } from '../shared/data/random';
import { initNodeBackend } from '../shared/node/tf-node';
import { StateSpaceModel } from '../shared/model/ssm';
import { defaultSsmSettings } from '../shared/model/ssm-settings';
import { SsmTrainer } from '../shared/model/trainer';
await initNodeBackend('wasm');
const parsed = parseCorpus(new Uint8Array(readFileSync('datasets-demo/archipelago-places.tsv')), { fileName: 'a.tsv' }) as any;
const alphabet = buildAlphabet(parsed.words.map((w: any) => w.word));
const batcher = createBatcher(parsed.words, { batchSize: 64, regime: 'token', rng: createRng(1) });
const batches = Array.from({ length: 20 }, () => encodeBatch(batcher.next(), alphabet));
const model = new StateSpaceModel(defaultSsmSettings(alphabet.size, { stateSize: 8, generativeFlow: [{ kind: 'coupling' }, { kind: 'coupling' }, { kind: 'diag' }], inferenceFlow: [{ kind: 'diag' }], encoderSize: 64 }), 1);
const trainer = new SsmTrainer(model, { learningRate: 0.01, samples: 8, clipNorm: 5 });
let i = 0;
const step = () => trainer.step(batches[i++ % batches.length]!);
for (let w = 0; w < 3; w++) step();
const n = Number(process.env.STEPS ?? 10);
const t0 = performance.now();
for (let w = 0; w < n; w++) step();
console.log('ms/step', ((performance.now() - t0) / n).toFixed(1));
const info = await tf.profile(() => { step(); });
const by: Record<string, { n: number; ms: number }> = {};
for (const k of info.kernels) { const e = (by[k.name] ??= { n: 0, ms: 0 }); e.n++; e.ms += Number(k.kernelTimeMs) || 0; }
console.log('kernels', info.kernels.length);
for (const [k, e] of Object.entries(by).sort((a, b) => b[1].ms - a[1].ms)) console.log(k.padEnd(22), String(e.n).padStart(6), e.ms.toFixed(1));
if (process.env.MM) { const mm: Record<string, {n:number,ms:number}> = {}; for (const k of info.kernels) if (k.name==='BatchMatMul'||k.name==='_FusedMatMul') { const key=JSON.stringify(k.inputShapes)+JSON.stringify((k as any).extraInfo??''); const e=(mm[key]??={n:0,ms:0}); e.n++; e.ms+=Number(k.kernelTimeMs)||0;} for (const [k,e] of Object.entries(mm).sort((a,b)=>b[1].ms-a[1].ms).slice(0,20)) console.log(k, e.n, e.ms.toFixed(1)); }
if (process.env.SHAPES) { const want = process.env.SHAPES.split(','); const sh: Record<string, {n:number,ms:number}> = {}; for (const k of info.kernels) if (want.includes(k.name)) { const key=k.name+' '+JSON.stringify(k.inputShapes); const e=(sh[key]??={n:0,ms:0}); e.n++; e.ms+=Number(k.kernelTimeMs)||0;} for (const [k,e] of Object.entries(sh).sort((a,b)=>b[1].ms-a[1].ms).slice(0,25)) console.log(k, e.n, e.ms.toFixed(1)); }
