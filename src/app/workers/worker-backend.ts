/// <reference lib="webworker" />
/**
 * TF.js set-up shared by every web worker: the WebAssembly backend (its .wasm files are served under
 * `tfjs-wasm/`), the CPU backend as a fallback, and a report of what is in use.
 */
import * as tf from '@tensorflow/tfjs-core';
import '@tensorflow/tfjs-backend-cpu';
import { getThreadsCount, setWasmPaths } from '@tensorflow/tfjs-backend-wasm';
import { installWasmKernels } from '../../../shared/model/wasm-kernels';
import type { BackendReport } from './trainer-session';

export async function setUpWorkerBackend(): Promise<BackendReport> {
  setWasmPaths(new URL('tfjs-wasm/', self.location.href).href);
  // The threaded build starts its helper threads from blob: scripts that call importScripts, which a module
  // worker cannot serve, and its thread count stays 1 in TF.js 4.22 anyway. Use the single-threaded SIMD
  // build: parallelism comes from one worker per run.
  tf.env().set('WASM_HAS_MULTITHREAD_SUPPORT', false);
  installWasmKernels(); // faster Slice, MatMul, Tanh, Identity kernels (see shared/model/wasm-*-kernels.ts)
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
