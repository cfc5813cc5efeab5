/**
 * Every kernel replacement this project makes in the TF.js WASM backend, installed in one call by the Node
 * set-up (`shared/node/tf-node.ts`) and the web workers' set-up (`src/app/workers/worker-backend.ts`), before the
 * backend is first used.
 */
import { installWasmSliceKernels } from './wasm-slice-kernels';
import { installWasmStepKernels } from './wasm-step-kernels';

/** Installs the slice and step kernels; false when the WASM backend is not loaded. Harmless to call again. */
export function installWasmKernels(): boolean {
  const slices = installWasmSliceKernels();
  const steps = installWasmStepKernels();
  return slices && steps;
}
