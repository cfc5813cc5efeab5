/**
 * Demo seed step: loads every `datasets-demo/*.tsv` into the demo bench through the same parse, split
 * and save path as an upload (default options). The demo corpora are invented; see datasets-demo/README.md.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { corpusOptionsSchema } from '../../shared/api/corpora';
import { analyseUpload } from '../modules/corpora/corpus-import';
import { CorpusRepository } from '../modules/corpora/corpus.repository';
import type { SeedStep } from './demo-seed';

export const DEMO_CORPORA_DIR = resolve(dirname(fileURLToPath(import.meta.url)), '../../datasets-demo');

const DESCRIPTIONS: Record<string, string> = {
  'archipelago-places.tsv': 'Invented place names of a fictional archipelago with invented Zipf-like counts.',
  'tea-blends.tsv': 'A made-up catalogue of one-word tea and spice blend names with invented order counts.',
  'syllable-grammar.tsv': 'Counts of 50,000 words sampled from a small syllable grammar whose exact entropy is known.',
};

/** "archipelago-places.tsv" -> "Archipelago places". */
export function demoCorpusName(fileName: string): string {
  const base = fileName.replace(/\.tsv$/, '').replace(/-/g, ' ');
  return base.charAt(0).toUpperCase() + base.slice(1);
}

export const loadDemoCorpora: SeedStep = {
  name: 'demo corpora',
  async run(ctx) {
    const bench = ctx.demo.bench;
    if (!bench) throw new Error('The demo corpora step needs the demo bench step before it.');
    const files = readdirSync(DEMO_CORPORA_DIR).filter((f) => f.endsWith('.tsv')).sort();
    const repo = new CorpusRepository(ctx.em);
    for (const fileName of files) {
      const bytes = new Uint8Array(readFileSync(join(DEMO_CORPORA_DIR, fileName)));
      const upload = analyseUpload(bytes, fileName, corpusOptionsSchema.parse({}));
      if (!upload.parsed.ok) {
        const first = upload.parsed.problems.find((p) => p.severity === 'error');
        throw new Error(`datasets-demo/${fileName} has errors: ${first?.message ?? 'unknown'}`);
      }
      await repo.save({
        bench,
        user: ctx.demo.admin ?? null,
        name: demoCorpusName(fileName),
        description: DESCRIPTIONS[fileName] ?? 'An invented demo corpus.',
        upload,
        at: ctx.clock.now(),
      });
    }
  },
};
