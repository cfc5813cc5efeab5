// Node-only TF.js set-up. Shared model code imports `@tensorflow/tfjs-core` only; this module pulls in the
// full `@tensorflow/tfjs` bundle (which registers the gradients and the CPU backend under Node ESM, where
// tfjs-core's own gradient registration does not import) and the WASM backend, then selects a backend.
// Both packages resolve to the same `@tensorflow/tfjs-core` module, so there is a single engine.
import * as tf from '@tensorflow/tfjs';
import '@tensorflow/tfjs-backend-wasm';
import { installWasmSliceKernels } from '../model/wasm-slice-kernels';

export type NodeBackendName = 'wasm' | 'cpu';

/**
 * Select the TF.js backend for Node. WASM is the default (single-threaded in Node, SIMD on); if it fails to
 * initialise, the CPU backend is used instead. Returns the name of the backend that is active.
 */
export async function initNodeBackend(name: NodeBackendName = 'wasm'): Promise<string> {
  if (name !== 'wasm' && name !== 'cpu') {
    throw new Error(`Unknown TF.js backend "${String(name)}": use "wasm" or "cpu".`);
  }
  installWasmSliceKernels();
  if (tf.getBackend() === name) return name;
  let ok = false;
  try {
    ok = await tf.setBackend(name);
  } catch {
    ok = false;
  }
  if (!ok && name === 'wasm') {
    ok = await tf.setBackend('cpu');
  }
  if (!ok) throw new Error(`Could not initialise the TF.js "${name}" backend or the CPU fallback.`);
  await tf.ready();
  return tf.getBackend();
}
