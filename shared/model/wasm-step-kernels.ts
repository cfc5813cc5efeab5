/**
 * Faster versions of three TF.js WASM backend kernels (TF.js 4.22) that a training step calls thousands of
 * times. Same results as the stock kernels (checked against the CPU backend and float64 references in
 * `wasm-step-kernels.spec.ts`); only the way they are computed differs:
 *
 * - `BatchMatMul` with `transposeA` / `transposeB`: the stock kernel sends every transposed product to a scalar
 *   loop (1.4–2.5 GFLOP/s against 4.4–35 for the untransposed XNNPACK path), and every gradient of a matmul is
 *   a transposed product. Here the transposed operand is first copied into its transpose (the stock Transpose
 *   kernel), then the untransposed path runs.
 * - `Tanh`: the stock kernel is a scalar loop; here `tanh(x) = 2 sigmoid(2x) - 1` runs through the backend's
 *   vectorised Sigmoid. Near 0, where that form loses relative precision, the odd Taylor polynomial
 *   `x - x^3/3 + 2x^5/15 - 17x^7/315` is used instead (|x| < 1/16: truncation error below 1e-12).
 * - `Identity`: the engine clones every tensor it keeps for a gradient (about 1,900 per reference step); the
 *   stock kernel copies the data, this one shares it (the CPU backend does the same; TF.js tensors never change
 *   their data in place).
 *
 * - `Concat`: the stock kernel makes a subarray per row and input (about 1,500 for the gradient of one split of a
 *   [512, 3h] tensor); rows up to 32 values are copied element by element here.
 *
 * Installed next to the slice kernels by `installWasmKernels` (`wasm-kernels.ts`).
 */
import {
  Add,
  BatchMatMul,
  Concat,
  backend_util,
  Identity,
  Sigmoid,
  Tanh,
  Transpose,
  getKernel,
  registerKernel,
  unregisterKernel,
  util,
  type DataType,
  type KernelConfig,
  type KernelFunc,
  type NamedAttrMap,
  type NamedTensorInfoMap,
  type TensorInfo,
} from '@tensorflow/tfjs-core';

/** The methods of the WASM backend these kernels use (public methods of `BackendWasm`). */
interface WasmBackend {
  makeOutput(shape: number[], dtype: DataType): TensorInfo;
  typedArrayFromHeap(info: TensorInfo): Float32Array | Int32Array | Uint8Array;
  disposeData(dataId: object): boolean;
  incRef(dataId: object): void;
}

type Args = { inputs: NamedTensorInfoMap; attrs?: NamedAttrMap; backend: unknown };
type Stock = (args: Args) => TensorInfo;

const MARK = Symbol.for('noisewright.stepKernel');

/** Rows up to this length are copied element by element (cheaper than a subarray per row). */
const SHORT_ROW = 32;

/** Below this |x| the Taylor polynomial of tanh is used (see the file comment). */
const TANH_SMALL = 1 / 16;

function stock(name: string): Stock {
  const k = getKernel(name, 'wasm');
  if (!k) throw new Error(`Internal error: the WASM backend has no ${name} kernel.`);
  return k.kernelFunc as unknown as Stock;
}

/** `perm` of a transpose of the last two axes of a rank-`rank` tensor. */
function swapLastTwo(rank: number): number[] {
  const perm = Array.from({ length: rank }, (_, i) => i);
  perm[rank - 2] = rank - 1;
  perm[rank - 1] = rank - 2;
  return perm;
}

function makeMatMul(matMul: Stock, transpose: Stock) {
  return (args: Args): TensorInfo => {
    const attrs = args.attrs as unknown as { transposeA: boolean; transposeB: boolean };
    if (!attrs.transposeA && !attrs.transposeB) return matMul(args);
    const backend = args.backend as WasmBackend;
    let a = args.inputs['a'] as TensorInfo;
    let b = args.inputs['b'] as TensorInfo;
    const temps: TensorInfo[] = [];
    if (attrs.transposeA) {
      a = transpose({ inputs: { x: a }, backend, attrs: { perm: swapLastTwo(a.shape.length) } });
      temps.push(a);
    }
    if (attrs.transposeB) {
      b = transpose({ inputs: { x: b }, backend, attrs: { perm: swapLastTwo(b.shape.length) } });
      temps.push(b);
    }
    const out = matMul({ inputs: { a, b }, backend, attrs: { ...args.attrs, transposeA: false, transposeB: false } });
    for (const t of temps) backend.disposeData(t.dataId);
    return out;
  };
}

/** tanh(x) for float32 data: 2 sigmoid(2x) - 1, and the Taylor polynomial for |x| < 1/16. (2x = x + x, exact.) */
function makeTanh(add: Stock, sigmoid: Stock, fallback: Stock) {
  return (args: Args): TensorInfo => {
    const x = args.inputs['x'] as TensorInfo;
    if (x.dtype !== 'float32') return fallback(args);
    const backend = args.backend as WasmBackend;
    const n = util.sizeFromShape(x.shape);
    const twice = add({ inputs: { a: x, b: x }, backend, attrs: {} });
    if (n === 0) return twice;
    const out = sigmoid({ inputs: { x: twice }, backend, attrs: {} });
    backend.disposeData(twice.dataId);
    // Views after the last allocation (allocating may grow, and so detach, the heap).
    const xs = backend.typedArrayFromHeap(x) as Float32Array;
    const ys = backend.typedArrayFromHeap(out) as Float32Array;
    for (let i = 0; i < n; i++) {
      const v = xs[i] as number;
      if (v > -TANH_SMALL && v < TANH_SMALL) {
        const v2 = v * v;
        ys[i] = v * (1 + v2 * (-1 / 3 + v2 * (2 / 15 - v2 * (17 / 315))));
      } else {
        ys[i] = 2 * (ys[i] as number) - 1;
      }
    }
    return out;
  };
}

function makeIdentity(fallback: Stock) {
  return (args: Args): TensorInfo => {
    const x = args.inputs['x'] as TensorInfo;
    if (x.dtype === 'string') return fallback(args);
    (args.backend as WasmBackend).incRef(x.dataId);
    return { dataId: x.dataId, shape: x.shape.slice(), dtype: x.dtype };
  };
}

/** Concatenation of numeric tensors along `axis` with a copy loop for short rows. */
function makeConcat(fallback: Stock) {
  return (args: Args): TensorInfo => {
    const inputs = args.inputs as unknown as TensorInfo[];
    const first = inputs[0] as TensorInfo;
    const parts = inputs.filter((t) => util.sizeFromShape(t.shape) > 0);
    if (first.dtype === 'string' || parts.length < 2) return fallback(args);
    const backend = args.backend as WasmBackend;
    const axis = util.parseAxisParam((args.attrs as unknown as { axis: number }).axis, first.shape)[0] as number;
    backend_util.assertParamsConsistent(inputs.map((t) => t.shape), axis);
    const out = backend.makeOutput(backend_util.computeOutShape(inputs.map((t) => t.shape), axis), first.dtype);
    const rows = util.sizeFromShape((parts[0] as TensorInfo).shape.slice(0, axis));
    const widths = parts.map((t) => util.sizeFromShape(t.shape.slice(axis)));
    const total = widths.reduce((a, b) => a + b, 0);
    const src = parts.map((t) => backend.typedArrayFromHeap(t));
    const dst = backend.typedArrayFromHeap(out);
    let col = 0;
    parts.forEach((_, i) => {
      const w = widths[i] as number;
      const a = src[i] as Float32Array;
      for (let r = 0; r < rows; r++) {
        const o = r * total + col;
        const p = r * w;
        if (w <= SHORT_ROW) for (let k = 0; k < w; k++) dst[o + k] = a[p + k] as number;
        else dst.set(a.subarray(p, p + w), o);
      }
      col += w;
    });
    return out;
  };
}

/**
 * Replaces the WASM backend's BatchMatMul, Tanh, Identity and Concat kernels. Returns false when the WASM backend is not
 * loaded; calling it again is harmless. Call before the backend is first used.
 */
export function installWasmStepKernels(): boolean {
  if (!getKernel(BatchMatMul, 'wasm')) return false;
  const replacements: Array<[string, (fallback: Stock) => Stock]> = [
    [BatchMatMul, (f) => makeMatMul(f, stock(Transpose))],
    [Tanh, (f) => makeTanh(stock(Add), stock(Sigmoid), f)],
    [Identity, (f) => makeIdentity(f)],
    [Concat, (f) => makeConcat(f)],
  ];
  for (const [name, make] of replacements) {
    const current = getKernel(name, 'wasm');
    if (!current || (current as unknown as Record<symbol, unknown>)[MARK]) continue;
    const config: KernelConfig = { ...current, kernelFunc: make(current.kernelFunc as unknown as Stock) as unknown as KernelFunc };
    (config as unknown as Record<symbol, unknown>)[MARK] = true;
    unregisterKernel(name, 'wasm');
    registerKernel(config);
  }
  return true;
}
