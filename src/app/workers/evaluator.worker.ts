/// <reference lib="webworker" />
/**
 * Web worker that evaluates checkpoints (every MODEL.md §7 figure), completes prefixes and draws noise maps.
 * TF.js on the WebAssembly backend (single-threaded SIMD build, as in trainer.worker.ts), CPU as a fallback.
 */
import * as tf from '@tensorflow/tfjs-core';
import '@tensorflow/tfjs-backend-cpu';
import { setWasmPaths } from '@tensorflow/tfjs-backend-wasm';
import { expose } from 'comlink';
import { EvaluatorSession, type EvaluatorBackend } from './evaluator-session';

let ready: Promise<EvaluatorBackend> | null = null;

async function setUpBackend(): Promise<EvaluatorBackend> {
  setWasmPaths(new URL('tfjs-wasm/', self.location.href).href);
  tf.env().set('WASM_HAS_MULTITHREAD_SUPPORT', false);
  let ok = false;
  try {
    ok = await tf.setBackend('wasm');
  } catch {
    ok = false;
  }
  if (!ok) await tf.setBackend('cpu');
  await tf.ready();
  const backend = tf.getBackend();
  const simd = backend === 'wasm' && (await tf.env().getAsync('WASM_HAS_SIMD_SUPPORT')) === true;
  return { backend, simd, threads: 1 };
}

expose(new EvaluatorSession(() => (ready ??= setUpBackend())));
