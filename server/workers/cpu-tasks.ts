/**
 * The CPU-heavy tasks that must not run on the server's event loop: bcrypt hashing and checking, and corpus
 * parsing + analysis. They run in worker threads (cpu-pool.ts); this module is what each thread loads.
 * Answers are compact: a corpus comes back as a summary plus its words joined by line feeds (a word never
 * holds one), so the main thread copies one string, not 150,000 objects.
 */
import bcrypt from 'bcryptjs';
import type { CorpusOptions } from '../../shared/api/corpora';
import { analyseUpload, toPreview, wordRows } from '../modules/corpora/corpus-import';
import { passwordStrength } from '../modules/auth/password-strength-check';

export type CpuTask =
  | { kind: 'hash'; password: string; cost: number }
  | { kind: 'compare'; password: string; hash: string }
  | { kind: 'analyse'; bytes: Uint8Array; fileName: string; options: CorpusOptions; rows: boolean }
  | { kind: 'strength'; password: string; userInputs: string[] };

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

export function analyseCorpus(bytes: Uint8Array, fileName: string, options: CorpusOptions, withRows: boolean): AnalysedCorpus {
  const analysed = analyseUpload(bytes, fileName, options);
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
      return analyseCorpus(task.bytes, task.fileName, task.options, task.rows);
    case 'strength':
      return passwordStrength(task.password, task.userInputs);
  }
}
