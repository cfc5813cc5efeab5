/**
 * The CPU-heavy tasks that must not run on the server's event loop: bcrypt hashing and checking, and corpus
 * parsing + analysis. They run in worker threads (cpu-pool.ts); this module is what each thread loads.
 * An upload is read from its temporary file as a stream and parsed line by line as the chunks arrive: the
 * file's bytes are never held whole, neither here nor on the main thread (only its parsed records are).
 * Answers are compact: a corpus comes back as a summary plus its words joined by line feeds (a word never
 * holds one), so the main thread copies one string, not 150,000 objects.
 */
import bcrypt from 'bcryptjs';
import { createReadStream } from 'node:fs';
import type { CorpusOptions } from '../../shared/api/corpora';
import { CorpusParser } from '../../shared/data/corpus-parse';
import { type AnalysedUpload, analyseParsed, analyseUpload, parseOptionsOf, toPreview, wordRows } from '../modules/corpora/corpus-import';
import { passwordStrength } from '../modules/auth/password-strength-check';

export type CpuTask =
  | { kind: 'hash'; password: string; cost: number }
  | { kind: 'compare'; password: string; hash: string }
  | { kind: 'analyse'; source: UploadSource; fileName: string; options: CorpusOptions; rows: boolean }
  | { kind: 'strength'; password: string; userInputs: string[] };

/** Where an upload's bytes are: a file (read as a stream) or, for small inputs and tests, memory. */
export type UploadSource = { path: string; size: number } | { bytes: Uint8Array };

/** Bytes read from an upload's file at a time. */
const READ_CHUNK_BYTES = 64 * 1024;

export interface AnalysedCorpus {
  preview: ReturnType<typeof toPreview>;
  /** The words to store, `\n`-joined, in the order of `counts`, `splits` and `lengths` (empty unless asked for). */
  words: string;
  counts: Float64Array;
  /** 0 train, 1 validation, 2 test. */
  splits: Uint8Array;
  lengths: Uint32Array;
}

export const SPLIT_CODES = ['train', 'validation', 'test'] as const;

/** Parses an upload's file chunk by chunk as it is read. */
async function analyseFile(path: string, fileName: string, options: CorpusOptions): Promise<AnalysedUpload> {
  const parser = new CorpusParser(parseOptionsOf(fileName, options));
  for await (const chunk of createReadStream(path, { highWaterMark: READ_CHUNK_BYTES })) parser.push(chunk as Buffer);
  return analyseParsed(parser.finish(), fileName, options);
}

export async function analyseCorpus(source: UploadSource, fileName: string, options: CorpusOptions, withRows: boolean): Promise<AnalysedCorpus> {
  const analysed = 'path' in source ? await analyseFile(source.path, fileName, options) : analyseUpload(source.bytes, fileName, options);
  const preview = toPreview(analysed);
  if (!withRows || !analysed.parsed.ok) {
    return { preview, words: '', counts: new Float64Array(0), splits: new Uint8Array(0), lengths: new Uint32Array(0) };
  }
  const rows = wordRows(analysed);
  const counts = new Float64Array(rows.length);
  const splits = new Uint8Array(rows.length);
  const lengths = new Uint32Array(rows.length);
  rows.forEach((r, i) => {
    counts[i] = r.count;
    splits[i] = SPLIT_CODES.indexOf(r.split);
    lengths[i] = r.length;
  });
  return { preview, words: rows.map((r) => r.word).join('\n'), counts, splits, lengths };
}

export default async function runTask(task: CpuTask): Promise<unknown> {
  switch (task.kind) {
    case 'hash':
      return bcrypt.hashSync(task.password, task.cost);
    case 'compare':
      return bcrypt.compareSync(task.password, task.hash);
    case 'analyse':
      return analyseCorpus(task.source, task.fileName, task.options, task.rows);
    case 'strength':
      return passwordStrength(task.password, task.userInputs);
  }
}
