/**
 * The versioned binary checkpoint format shared by every model family (see CHECKPOINT-FORMAT.md).
 * Layout (little-endian): magic "NWCK" | u32 format version | u32 header length | UTF-8 JSON header |
 * zero padding to a multiple of 4 | Float32 payload (the tensors in manifest order) .
 * Framework-free: runs unchanged in the browser, the worker and Node.
 */
import type { NamedWeights } from './params';
import { renameLegacySettingKeys } from './settings-keys';
import { MODEL_FAMILIES, type ModelFamilyName } from './settings-rules';

export const CHECKPOINT_MAGIC = 'NWCK';
export const CHECKPOINT_FORMAT_VERSION = 1;
const PREFIX_BYTES = 12;

export type ModelFamily = ModelFamilyName;
const FAMILIES: readonly ModelFamily[] = MODEL_FAMILIES;

export interface Checkpoint {
  formatVersion: number;
  family: ModelFamily;
  /** The model's settings (family-specific, JSON-serialisable). */
  settings: unknown;
  /** Alphabet characters without EOW (id i = alphabet[i-1]). */
  alphabet: string[];
  /** Optimisation steps done when the checkpoint was written. */
  step: number;
  seed: number | string;
  weights: NamedWeights;
  /** Optimiser state for an exact resume (absent for closed-form models). */
  optimizer?: NamedWeights;
  /** ISO date-time. */
  createdAt: string;
  /** How to rebuild the training words (shared/data/training-words.ts); absent in older checkpoints. */
  trainingWords?: unknown;
}

export type CheckpointErrorCode = 'BAD_MAGIC' | 'UNSUPPORTED_VERSION' | 'TRUNCATED' | 'CORRUPT' | 'SHAPE_MISMATCH';

export class CheckpointError extends Error {
  override readonly name = 'CheckpointError';
  constructor(readonly code: CheckpointErrorCode, message: string) {
    super(message);
  }
}

interface ManifestEntry {
  name: string;
  group: 'weights' | 'optimizer';
  shape: number[];
  /** Offset in Float32 elements from the start of the payload. */
  offset: number;
  length: number;
}

interface Header {
  family: ModelFamily;
  settings: unknown;
  alphabet: string[];
  step: number;
  seed: number | string;
  createdAt: string;
  trainingWords?: unknown;
  tensors: ManifestEntry[];
  payloadFloats: number;
}

const LITTLE_ENDIAN_HOST = new Uint8Array(Uint16Array.of(1).buffer)[0] === 1;
const align4 = (n: number): number => (n + 3) & ~3;

function entries(group: ManifestEntry['group'], w: NamedWeights | undefined, start: number, out: ManifestEntry[]): number {
  let offset = start;
  for (const name of Object.keys(w ?? {}).sort()) {
    const t = (w as NamedWeights)[name] as NamedWeights[string];
    const length = t.shape.reduce((a, b) => a * b, 1);
    if (length !== t.values.length) {
      throw new CheckpointError('SHAPE_MISMATCH', `Tensor "${name}" has ${t.values.length} values but shape [${t.shape.join(', ')}].`);
    }
    out.push({ name, group, shape: t.shape.slice(), offset, length });
    offset += length;
  }
  return offset;
}

/** Serialises a checkpoint to bytes; `decodeCheckpoint(encodeCheckpoint(c))` restores every value bit for bit. */
export function encodeCheckpoint(ck: Omit<Checkpoint, 'formatVersion'> & { formatVersion?: number }): Uint8Array {
  if (!FAMILIES.includes(ck.family)) throw new Error(`Unknown model family "${String(ck.family)}"; use ssm, gru or ngram.`);
  const tensors: ManifestEntry[] = [];
  const afterWeights = entries('weights', ck.weights, 0, tensors);
  const payloadFloats = entries('optimizer', ck.optimizer, afterWeights, tensors);
  const header: Header = {
    family: ck.family,
    settings: ck.settings,
    alphabet: ck.alphabet,
    step: ck.step,
    seed: ck.seed,
    createdAt: ck.createdAt,
    ...(ck.trainingWords !== undefined ? { trainingWords: ck.trainingWords } : {}),
    tensors,
    payloadFloats,
  };
  const headerBytes = new TextEncoder().encode(JSON.stringify(header));
  const payloadStart = align4(PREFIX_BYTES + headerBytes.length);
  const bytes = new Uint8Array(payloadStart + payloadFloats * 4);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < 4; i++) bytes[i] = CHECKPOINT_MAGIC.charCodeAt(i);
  view.setUint32(4, CHECKPOINT_FORMAT_VERSION, true);
  view.setUint32(8, headerBytes.length, true);
  bytes.set(headerBytes, PREFIX_BYTES);
  for (const e of tensors) {
    const source = (e.group === 'weights' ? ck.weights : (ck.optimizer as NamedWeights))[e.name] as NamedWeights[string];
    writeFloats(bytes, payloadStart + e.offset * 4, source.values);
  }
  return bytes;
}

function writeFloats(bytes: Uint8Array, at: number, values: Float32Array): void {
  if (LITTLE_ENDIAN_HOST) {
    bytes.set(new Uint8Array(values.buffer, values.byteOffset, values.byteLength), at);
  } else {
    const view = new DataView(bytes.buffer, bytes.byteOffset);
    values.forEach((v, i) => view.setFloat32(at + 4 * i, v, true));
  }
}

function readFloats(bytes: Uint8Array, at: number, length: number): Float32Array {
  const out = new Float32Array(length);
  if (LITTLE_ENDIAN_HOST) {
    new Uint8Array(out.buffer).set(bytes.subarray(at, at + length * 4));
  } else {
    const view = new DataView(bytes.buffer, bytes.byteOffset);
    for (let i = 0; i < length; i++) out[i] = view.getFloat32(at + 4 * i, true);
  }
  return out;
}

const truncated = (what: string) =>
  new CheckpointError('TRUNCATED', `The checkpoint file is incomplete (${what} is cut off); download or export it again.`);

/** Parses checkpoint bytes, with a specific `CheckpointError` for every way a file can be unusable. */
export function decodeCheckpoint(bytes: Uint8Array): Checkpoint {
  if (bytes.length < 4 || String.fromCharCode(...bytes.subarray(0, 4)) !== CHECKPOINT_MAGIC) {
    throw new CheckpointError('BAD_MAGIC', 'This file is not a Noisewright checkpoint (it does not start with "NWCK"); choose a checkpoint file.');
  }
  if (bytes.length < PREFIX_BYTES) throw truncated('the file header');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const version = view.getUint32(4, true);
  if (version !== CHECKPOINT_FORMAT_VERSION) {
    throw new CheckpointError(
      'UNSUPPORTED_VERSION',
      `This checkpoint uses format version ${version}, but this version of Noisewright reads version ` +
        `${CHECKPOINT_FORMAT_VERSION}; open it with a matching version of Noisewright.`,
    );
  }
  const headerLength = view.getUint32(8, true);
  if (bytes.length < PREFIX_BYTES + headerLength) throw truncated('the settings block');
  let header: Header;
  try {
    header = JSON.parse(new TextDecoder('utf-8', { fatal: true }).decode(bytes.subarray(PREFIX_BYTES, PREFIX_BYTES + headerLength))) as Header;
  } catch {
    throw new CheckpointError('CORRUPT', 'The checkpoint\'s settings block is damaged (not valid JSON); export the checkpoint again.');
  }
  checkHeader(header);
  const payloadStart = align4(PREFIX_BYTES + headerLength);
  const expected = payloadStart + header.payloadFloats * 4;
  if (bytes.length < expected) throw truncated('the weights');
  if (bytes.length > expected) {
    throw new CheckpointError('CORRUPT', `The checkpoint has ${bytes.length - expected} unexpected bytes at the end; export it again.`);
  }
  const weights: NamedWeights = {};
  const optimizer: NamedWeights = {};
  for (const e of header.tensors) {
    const target = e.group === 'weights' ? weights : optimizer;
    target[e.name] = { shape: e.shape.slice(), values: readFloats(bytes, payloadStart + e.offset * 4, e.length) };
  }
  const hasOptimizer = header.tensors.some((e) => e.group === 'optimizer');
  return {
    formatVersion: version,
    family: header.family,
    // Older GRU checkpoints spelled two keys differently (settings-keys.ts).
    settings: header.family === 'gru' ? renameLegacySettingKeys(header.settings) : header.settings,
    alphabet: header.alphabet,
    step: header.step,
    seed: header.seed,
    weights,
    ...(hasOptimizer ? { optimizer } : {}),
    createdAt: header.createdAt,
    ...(header.trainingWords !== undefined ? { trainingWords: header.trainingWords } : {}),
  };
}

function checkHeader(h: Header): void {
  const bad = (what: string) => new CheckpointError('CORRUPT', `The checkpoint's settings block is damaged (${what}); export it again.`);
  if (!h || typeof h !== 'object') throw bad('no header object');
  if (!FAMILIES.includes(h.family)) throw bad(`unknown model family ${JSON.stringify(h.family)}`);
  if (!Array.isArray(h.alphabet) || !h.alphabet.every((c) => typeof c === 'string')) throw bad('alphabet');
  if (!Number.isInteger(h.step) || h.step < 0) throw bad('step');
  if (typeof h.createdAt !== 'string') throw bad('creation date');
  if (!Number.isInteger(h.payloadFloats) || h.payloadFloats < 0) throw bad('payload size');
  if (!Array.isArray(h.tensors)) throw bad('tensor list');
  for (const e of h.tensors) {
    const ok =
      e && typeof e.name === 'string' && (e.group === 'weights' || e.group === 'optimizer') && Array.isArray(e.shape) &&
      e.shape.every((n) => Number.isInteger(n) && n >= 0) && e.shape.reduce((a, b) => a * b, 1) === e.length &&
      Number.isInteger(e.offset) && e.offset >= 0 && e.offset + e.length <= h.payloadFloats;
    if (!ok) throw bad(`tensor entry ${JSON.stringify(e?.name)}`);
  }
}
