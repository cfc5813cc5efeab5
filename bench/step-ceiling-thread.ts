/**
 * One ceiling thread of bench/step-ceiling.ts: TF.js on WASM (as a runner thread), the benchmark run's engine
 * (`createEngine`, the runner's), 5 warm-up steps, then on `go` it times `steps` steps and posts ms per step.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { initNodeBackend } from '../shared/node/tf-node';
import { createEngine } from '../shared/training/run-engines';
import { trainerSettingsOf } from '../shared/training/run-settings';
import type { RunSettings } from '../shared/api/runs';
import { benchRunSettings, benchTrainingSet } from './step-ceiling';

const port = parentPort;
if (!port) throw new Error('bench/step-ceiling-thread.ts runs only as a worker thread.');
const { steps, seed } = workerData as { steps: number; seed: number };
await initNodeBackend('wasm');
const settings = benchRunSettings(steps);
const engine = createEngine(trainerSettingsOf({ family: 'ssm', settings: { ...settings, training: { ...settings.training, seed } } as unknown as RunSettings }), benchTrainingSet(), null);
for (let i = 0; i < 5; i++) engine.step();
port.once('message', () => {
  const t0 = performance.now();
  for (let i = 0; i < steps; i++) engine.step();
  const msPerStep = (performance.now() - t0) / steps;
  engine.dispose();
  port.postMessage({ type: 'timed', msPerStep });
});
port.postMessage({ type: 'ready' });
