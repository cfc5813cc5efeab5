/// <reference lib="webworker" />
/**
 * Web worker that trains one run. TF.js runs here on the WebAssembly backend (SIMD and threads when the page is
 * cross-origin isolated), with the CPU backend as a fallback; the page talks to it through comlink
 * (`TrainerApi`, see trainer-client.ts).
 */
import * as tf from '@tensorflow/tfjs-core';
import '@tensorflow/tfjs-core/dist/register_all_gradients';
import '@tensorflow/tfjs-backend-cpu';
import { getThreadsCount, setWasmPaths } from '@tensorflow/tfjs-backend-wasm';
import { expose } from 'comlink';
import { TrainerSession, type BackendReport } from './trainer-session';

let ready: Promise<BackendReport> | null = null;

async function setUpBackend(): Promise<BackendReport> {
  setWasmPaths(new URL('tfjs-wasm/', self.location.href).href);
  // The threaded build starts its helper threads from blob: scripts that call importScripts, which a module
  // worker cannot serve; and its thread count stays 1 anyway (STACK.md). Use the single-threaded SIMD build:
  // parallelism comes from one worker per run.
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
  if (backend !== 'wasm') return { backend, simd: false, threads: 1 };
  const simd = (await tf.env().getAsync('WASM_HAS_SIMD_SUPPORT')) === true;
  let threads = 1;
  try {
    threads = getThreadsCount();
  } catch {
    threads = 1;
  }
  return { backend, simd, threads };
}

expose(new TrainerSession(() => (ready ??= setUpBackend())));
