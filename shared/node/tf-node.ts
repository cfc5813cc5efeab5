// Node-only TF.js set-up. Shared model code imports `@tensorflow/tfjs-core` only; this module pulls in the
// full `@tensorflow/tfjs` bundle (which registers the gradients and the CPU backend under Node ESM, where
// tfjs-core's own gradient registration does not import) and the WASM backend, then selects a backend.
// Both packages resolve to the same `@tensorflow/tfjs-core` module, so there is a single engine.
import * as tf from '@tensorflow/tfjs';
import '@tensorflow/tfjs-backend-wasm';
import { installWasmKernels } from '../model/wasm-kernels';

export type NodeBackendName = 'wasm' | 'cpu';

/** Called when the WASM backend cannot start and the CPU backend is used instead (default: a warning on stderr). */
export type BackendFallbackReport = (message: string) => void;

const warnOnStderr: BackendFallbackReport = (message) => {
  process.stderr.write(`Warning: ${message}\n`);
};

/**
 * Select the TF.js backend for Node. WASM is the default (single-threaded in Node, SIMD on); if it fails to
 * initialise, the CPU backend is used instead — several times slower — and `onFallback` is told why (by default
 * a warning on stderr, so a command-line run shows it). Returns the name of the backend that is active.
 */
export async function initNodeBackend(name: NodeBackendName = 'wasm', onFallback: BackendFallbackReport = warnOnStderr): Promise<string> {
  if (name !== 'wasm' && name !== 'cpu') {
    throw new Error(`Unknown TF.js backend "${String(name)}": use "wasm" or "cpu".`);
  }
  installWasmKernels();
  if (tf.getBackend() === name) return name;
  let ok = false;
  let reason = 'setBackend returned false';
  try {
    ok = await tf.setBackend(name);
  } catch (e) {
    ok = false;
    reason = e instanceof Error ? e.message : String(e);
  }
  if (!ok && name === 'wasm') {
    ok = await tf.setBackend('cpu');
    if (ok) {
      onFallback(
        `the TF.js WebAssembly backend could not start (${reason}); using the CPU backend instead, which is several ` +
          'times slower. Check that @tensorflow/tfjs-backend-wasm is installed with its .wasm files.',
      );
    }
  }
  if (!ok) throw new Error(`Could not initialise the TF.js "${name}" backend or the CPU fallback.`);
  await tf.ready();
  return tf.getBackend();
}
