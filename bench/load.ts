/**
 * `npm run bench:load`: the server under the floods that used to stall it, each while `GET /api/health`
 * is measured. Everything on loopback, bounded in time (LOAD_SECONDS per flood, default 10) and count.
 * Targets: health p99 < 100 ms in every flood, no time-outs, no 5xx, no SQLITE_BUSY in the server output.
 * Prints a table and writes bench/results/load.json; `--readme` also updates README.md's "Under load" figures.
 */
import autocannon from 'autocannon';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { loadavg, cpus } from 'node:os';
import seedrandom from 'seedrandom';
import { api, multipart, startChildServer } from './load-server';

const SECONDS = Number(process.env['LOAD_SECONDS'] ?? 10);
const PASSWORD = 'load test phrase 9 kettles';

/** An invented corpus of about 1.4 MB: 150,000 distinct made-up words with counts (tsv). */
function bigCorpus(): Buffer {
  const rng = seedrandom('load-corpus');
  const letters = 'abcdefghijklmnopqrstuvwxyz';
  const seen = new Set<string>();
  const lines = ['word\tcount'];
  while (seen.size < 150_000) {
    const n = 4 + Math.floor(rng() * 4);
    let w = '';
    for (let i = 0; i < n; i++) w += letters[Math.floor(rng() * 26)];
    if (seen.has(w)) continue;
    seen.add(w);
    lines.push(`${w}\t${1 + Math.floor(rng() * 20)}`);
  }
  return Buffer.from(`${lines.join('\n')}\n`, 'utf8');
}

interface FloodRow {
  flood: string;
  requests: number;
  floodP99Ms: number;
  floodStatus: Record<string, number>;
  healthRequests: number;
  healthP50Ms: number;
  healthP99Ms: number;
  healthMaxMs: number;
  timeouts: number;
  fiveXx: number;
}

function statusCounts(r: autocannon.Result): Record<string, number> {
  const out: Record<string, number> = {};
  for (const [code, v] of Object.entries(r.statusCodeStats ?? {})) out[code] = (v as { count?: number }).count ?? 0;
  return out;
}

function fiveXx(counts: Record<string, number>): number {
  return Object.entries(counts).filter(([c]) => c.startsWith('5')).reduce((a, [, n]) => a + n, 0);
}

const ONLY = process.env['LOAD_ONLY'] ?? '';

async function flood(url: string, name: string, opts: autocannon.Options): Promise<FloodRow> {
  if (ONLY && !new RegExp(ONLY).test(name)) return { flood: `${name} (skipped)`, requests: 0, floodP99Ms: 0, floodStatus: {}, healthRequests: 0, healthP50Ms: 0, healthP99Ms: 0, healthMaxMs: 0, timeouts: 0, fiveXx: 0 };
  // Start each flood from a quiet server: work left over from the previous one must not count here.
  await new Promise((r) => setTimeout(r, 2000));
  const health = autocannon({ url: `${url}/api/health`, connections: 2, duration: Number(opts.duration ?? SECONDS), timeout: 10 });
  const load = autocannon({ timeout: 30, duration: SECONDS, ...opts, url: `${url}${opts.url}` });
  const [h, l] = await Promise.all([health, load]);
  const floodStatus = statusCounts(l);
  return {
    flood: name,
    requests: l.requests.total,
    floodP99Ms: l.latency.p99,
    floodStatus,
    healthRequests: h.requests.total,
    healthP50Ms: h.latency.p50,
    healthP99Ms: h.latency.p99,
    healthMaxMs: h.latency.max,
    timeouts: h.timeouts + l.timeouts,
    fiveXx: fiveXx(floodStatus) + fiveXx(statusCounts(h)),
  };
}

async function main(): Promise<void> {
  const server = await startChildServer({ BCRYPT_COST: '10', AUTH_RATE_LIMIT: '1000000', JSON_BODY_LIMIT_BYTES: '2097152', MAX_UPLOAD_BYTES: '5242880' });
  const rows: FloodRow[] = [];
  try {
    const signup = await api<{ token: string }>(server.url, 'POST', '/auth/signup', { email: 'load@example.org', password: PASSWORD, displayName: 'Load' });
    if (signup.status !== 201) throw new Error(`sign-up failed: ${JSON.stringify(signup.body)}`);
    const token = signup.body.token;
    const auth = { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' };
    const bench = await api<{ id: string }>(server.url, 'POST', '/benches', { name: 'Load bench' }, token);
    const corpus = bigCorpus();
    const form = multipart({ name: 'big.tsv', bytes: corpus }, { name: 'Big corpus' });
    const seeded = await fetch(`${server.url}/api/benches/${bench.body.id}/corpora`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': form.contentType }, body: new Uint8Array(form.body) });
    if (seeded.status !== 201) throw new Error(`corpus upload failed: ${seeded.status} ${await seeded.text()}`);
    const corpusId = ((await seeded.json()) as { id: string }).id;

    rows.push(await flood(server.url, 'idle (health only)', { url: '/api/health', connections: 1, amount: 1 }));
    rows.push(await flood(server.url, '50 wrong-password changes', {
      url: '/api/auth/password', method: 'POST', connections: 50, headers: auth,
      body: JSON.stringify({ currentPassword: 'not my password at all', newPassword: 'another long phrase 42' }),
    }));
    rows.push(await flood(server.url, '50 sign-ins', {
      url: '/api/auth/signin', method: 'POST', connections: 50, headers: { 'Content-Type': 'application/json' },
      body: JSON.stringify({ email: 'load@example.org', password: PASSWORD }),
    }));
    rows.push(await flood(server.url, `10 uploads of ${(corpus.length / 1e6).toFixed(1)} MB`, {
      url: `/api/benches/${bench.body.id}/corpora`, method: 'POST', connections: 10, amount: 20, duration: SECONDS * 6,
      headers: { Authorization: `Bearer ${token}`, 'Content-Type': form.contentType }, body: form.body,
    }));
    rows.push(await flood(server.url, '50 readers', {
      url: `/api/benches/${bench.body.id}/corpora/${corpusId}/words?sort=count&limit=100`, connections: 50, headers: auth,
    }));
  } finally {
    await server.stop();
    if (process.env['LOAD_VERBOSE']) console.log(server.output().slice(-4000));
  }
  const busy = (server.output().match(/SQLITE_BUSY/g) ?? []).length;
  const summary = {
    measuredAt: new Date().toISOString(),
    command: 'npm run bench:load',
    secondsPerFlood: SECONDS,
    machine: { cpus: cpus().length, loadAverage: loadavg().map((x) => Number(x.toFixed(2))) },
    bcryptCost: 10,
    sqliteBusy: busy,
    targets: { healthP99Ms: 100, timeouts: 0, fiveXx: 0, sqliteBusy: 0 },
    met: rows.every((r) => r.healthP99Ms < 100 && r.timeouts === 0 && r.fiveXx === 0) && busy === 0,
    rows,
  };
  console.table(rows.map((r) => ({ flood: r.flood, requests: r.requests, 'flood p99 ms': r.floodP99Ms, statuses: JSON.stringify(r.floodStatus), 'health p50': r.healthP50Ms, 'health p99': r.healthP99Ms, 'health max': r.healthMaxMs, timeouts: r.timeouts, '5xx': r.fiveXx })));
  console.log(`SQLITE_BUSY in server output: ${busy}; load average ${summary.machine.loadAverage.join(' ')}; targets met: ${summary.met}`);
  mkdirSync('bench/results', { recursive: true });
  writeFileSync('bench/results/load.json', `${JSON.stringify(summary, null, 2)}\n`);
  if (process.argv.includes('--readme')) writeReadme(summary);
  process.exit(summary.met ? 0 : 1);
}

const LOAD_START = '<!-- load:start -->';
const LOAD_END = '<!-- load:end -->';

function writeReadme(s: { measuredAt: string; machine: { cpus: number; loadAverage: number[] }; sqliteBusy: number; rows: FloodRow[] }): void {
  const lines = [
    `Measured by \`npm run bench:load\` on ${s.measuredAt.slice(0, 10)} (${s.machine.cpus} cores, load average ${s.machine.loadAverage[0]} at the end, bcrypt cost 10, ${SECONDS} s per flood; figures in bench/results/load.json):`,
    '',
    '| flood | requests | `GET /api/health` p50 / p99 / max (ms) | time-outs | 5xx |',
    '|---|---:|---|---:|---:|',
    ...s.rows.map((r) => `| ${r.flood} | ${r.requests} | ${r.healthP50Ms} / ${r.healthP99Ms} / ${r.healthMaxMs} | ${r.timeouts} | ${r.fiveXx} |`),
    '',
    `SQLITE_BUSY errors: ${s.sqliteBusy}.`,
  ];
  const text = readFileSync('README.md', 'utf8');
  const block = `${LOAD_START}\n${lines.join('\n')}\n${LOAD_END}`;
  const a = text.indexOf(LOAD_START);
  const b = text.indexOf(LOAD_END);
  const next = a >= 0 && b > a ? text.slice(0, a) + block + text.slice(b + LOAD_END.length) : `${text.trimEnd()}\n\n## Under load\n\n${block}\n`;
  writeFileSync('README.md', next);
}

main().catch((error: unknown) => {
  console.error(error);
  process.exit(1);
});
