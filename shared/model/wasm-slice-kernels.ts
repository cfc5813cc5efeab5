/**
 * Replacements for the TF.js WASM backend's `Slice`, `Unpack` and `SplitV` kernels (TF.js 4.22).
 *
 * The stock kernel copies the WHOLE input out of the WebAssembly heap (`readSync`, a `HEAPU8.slice`) for every
 * slice it makes, then copies the slice out of that copy. `tf.unstack`, `tf.split` and their gradients call it
 * once per piece, so unstacking a [T, …] tensor copies it T times. In Node the copy is cheap; in a Chromium
 * worker `slice()` on the heap buffer is several times slower, and this alone made a training step of the
 * reference configuration about 1.7–2.1× slower in the browser than in Node (see bench/README.md).
 *
 * These kernels read the input through a view of the heap instead, and copy only the rows they need. (The
 * stock Unpack and SplitV call the stock slice function directly, so all three are replaced.) The output is
 * allocated first: allocating can grow the heap, which detaches any view made before it. Strings
 * keep the stock kernel (they do not live in the heap).
 *
 * Installed (through `installWasmKernels`, `wasm-kernels.ts`) by the Node set-up (`shared/node/tf-node.ts`) and
 * the web workers' set-up (`src/app/workers/worker-backend.ts`); checked against the CPU backend in
 * `wasm-slice-kernels.spec.ts`.
 */
import {
  Slice,
  SplitV,
  Unpack,
  backend_util,
  getKernel,
  registerKernel,
  slice_util,
  unregisterKernel,
  util,
  type DataType,
  type KernelConfig,
  type KernelFunc,
  type NamedAttrMap,
  type NamedTensorInfoMap,
  type TensorInfo,
} from '@tensorflow/tfjs-core';

/** The two methods of the WASM backend this kernel uses (public methods of `BackendWasm`). */
interface HeapBackend {
  makeOutput(shape: number[], dtype: DataType): TensorInfo;
  typedArrayFromHeap(info: TensorInfo): Float32Array | Int32Array | Uint8Array;
}

const MARK = Symbol.for('noisewright.viewSlice');

/** Rows up to this length are copied element by element: cheaper than making a subarray per row. */
const SHORT_ROW = 32;

/** Copies `size` elements starting at `begin` of a row-major tensor of `shape` from `src` into `dst`. */
export function copySlice(
  src: Float32Array | Int32Array | Uint8Array, shape: readonly number[], begin: readonly number[], size: readonly number[],
  dst: Float32Array | Int32Array | Uint8Array,
): void {
  const rank = shape.length;
  if (rank === 0) {
    if (dst.length > 0) dst[0] = src[0] as number;
    return;
  }
  const strides = util.computeStrides(shape as number[]);
  const row = size[rank - 1] as number;
  const outer = size.slice(0, rank - 1);
  const rows = outer.reduce((a, b) => a * b, 1);
  if (row === 0 || rows === 0) return;
  const index = new Array<number>(rank - 1).fill(0);
  let out = 0;
  for (let r = 0; r < rows; r++) {
    let offset = begin[rank - 1] as number;
    for (let a = 0; a < rank - 1; a++) offset += ((begin[a] as number) + (index[a] as number)) * (strides[a] as number);
    if (row <= SHORT_ROW) {
      for (let k = 0; k < row; k++) dst[out + k] = src[offset + k] as number;
    } else {
      dst.set(src.subarray(offset, offset + row), out);
    }
    out += row;
    // odometer over the outer axes, last axis fastest
    for (let a = rank - 2; a >= 0; a--) {
      index[a] = (index[a] as number) + 1;
      if ((index[a] as number) < (outer[a] as number)) break;
      index[a] = 0;
    }
  }
}

type Args = { inputs: NamedTensorInfoMap; attrs?: NamedAttrMap; backend: unknown };

/** Slice of a numeric tensor read through a heap view; `null` for strings (the stock kernel handles those). */
function viewSlice(x: TensorInfo, beginIn: number | number[], sizeIn: number | number[] | undefined, backend: HeapBackend): TensorInfo {
  const [begin, size] = slice_util.parseSliceParams(x, beginIn, sizeIn);
  const out = backend.makeOutput(size, x.dtype); // first: it may grow (and so detach) the heap
  if (util.sizeFromShape(size) === 0) return out;
  const xVals = backend.typedArrayFromHeap(x);
  const outVals = backend.typedArrayFromHeap(out);
  if (slice_util.isSliceContinous(x.shape, begin, size)) {
    const flat = slice_util.computeFlatOffset(begin, util.computeStrides(x.shape));
    outVals.set(xVals.subarray(flat, flat + outVals.length));
  } else {
    copySlice(xVals, x.shape, begin, size, outVals);
  }
  return out;
}

function sliceKernel(args: Args): TensorInfo {
  const x = args.inputs['x'] as TensorInfo;
  const attrs = args.attrs as unknown as { begin: number | number[]; size?: number | number[] };
  return viewSlice(x, attrs.begin, attrs.size, args.backend as HeapBackend);
}

/** Same outputs as the stock Unpack kernel: one slice per index along `axis`, that axis dropped. */
function unpackKernel(args: Args): TensorInfo[] {
  const value = args.inputs['value'] as TensorInfo;
  let axis = (args.attrs as unknown as { axis: number }).axis;
  if (axis < 0) axis += value.shape.length;
  const outShape = value.shape.filter((_, i) => i !== axis);
  const begin = new Array<number>(value.shape.length).fill(0);
  const size = value.shape.slice();
  size[axis] = 1;
  const outs: TensorInfo[] = [];
  for (let i = 0; i < (value.shape[axis] as number); i++) {
    begin[axis] = i;
    const piece = viewSlice(value, begin, size, args.backend as HeapBackend);
    outs.push({ dataId: piece.dataId, dtype: piece.dtype, shape: outShape });
  }
  return outs;
}

/** Same outputs as the stock SplitV kernel: consecutive slices along `axis` of the given sizes. */
function splitKernel(args: Args): TensorInfo[] {
  const x = args.inputs['x'] as TensorInfo;
  const attrs = args.attrs as unknown as { numOrSizeSplits: number | number[]; axis: number };
  const axis = util.parseAxisParam(attrs.axis, x.shape)[0] as number;
  const sizes = backend_util.prepareSplitSize(x, attrs.numOrSizeSplits, axis);
  const begin = new Array<number>(x.shape.length).fill(0);
  return sizes.map((s) => {
    const size = x.shape.slice();
    size[axis] = s;
    const piece = viewSlice(x, begin.slice(), size, args.backend as HeapBackend);
    begin[axis] = (begin[axis] as number) + s;
    return piece;
  });
}

/** Input name of each replaced kernel: a string input goes to the stock kernel. */
const REPLACEMENTS: ReadonlyArray<[string, string, (args: Args) => TensorInfo | TensorInfo[]]> = [
  [Slice, 'x', sliceKernel],
  [Unpack, 'value', unpackKernel],
  [SplitV, 'x', splitKernel],
];

/**
 * Replaces the WASM backend's Slice, Unpack and SplitV kernels by view-based ones. Returns false when the WASM
 * backend is not loaded (nothing to replace); calling it again is harmless.
 */
export function installWasmSliceKernels(): boolean {
  if (!getKernel(Slice, 'wasm')) return false;
  for (const [name, input, replacement] of REPLACEMENTS) {
    const stock = getKernel(name, 'wasm');
    if (!stock || (stock as unknown as Record<symbol, unknown>)[MARK]) continue;
    const fallback = stock.kernelFunc;
    const kernelFunc = (args: Args) =>
      (args.inputs[input] as TensorInfo).dtype === 'string' ? fallback(args as Parameters<KernelFunc>[0]) : replacement(args);
    const config: KernelConfig = { ...stock, kernelFunc: kernelFunc as unknown as KernelFunc };
    (config as unknown as Record<symbol, unknown>)[MARK] = true;
    unregisterKernel(name, 'wasm');
    registerKernel(config);
  }
  return true;
}
