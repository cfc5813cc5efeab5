// Kill -9 during writes: the server (a child process on a loopback port, WAL journal) is killed while
// corpus uploads, metric batches and checkpoint saves stream in; after a restart SQLite's
// `PRAGMA integrity_check` answers "ok", every write the server acknowledged is there, and nothing half
// written is visible (a corpus has all its words or does not exist; a batch has all its points or none).
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { api, multipart, startChildServer } from '../../bench/load-server';
import { ssmCheckpointBytes, ssmRunBody } from '../../server/modules/runs/runs-test-helpers';
import { openDatabase } from '../../server/db/orm';

const dir = mkdtempSync(join(tmpdir(), 'noisewright-crash-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const env = { BCRYPT_COST: '4', AUTH_RATE_LIMIT: '100000', LOG_LEVEL: 'error' };
const PASSWORD = 'crash test phrase 7 lanterns';

function corpusText(k: number, words: number): Buffer {
  const lines = ['word\tcount'];
  for (let i = 0; i < words; i++) lines.push(`${'abc'[k % 3]}${i.toString(3).replace(/0/g, 'a').replace(/1/g, 'b').replace(/2/g, 'c')}\t${1 + (i % 7)}`);
  return Buffer.from(`${lines.join('\n')}\n`);
}

describe('SIGKILL during writes', () => {
  it('loses no acknowledged write and shows nothing half-written', { timeout: 90_000 }, async () => {
    const server = await startChildServer(env, { dir });
    const { url } = server;
    const signup = await api<{ token: string }>(url, 'POST', '/auth/signup', { email: 'crash@example.org', password: PASSWORD, displayName: 'Crash' });
    const token = signup.body.token;
    const bench = (await api<{ id: string }>(url, 'POST', '/benches', { name: 'Crash bench' }, token)).body.id;
    const first = multipart({ name: 'c.tsv', bytes: corpusText(0, 200) }, { name: 'Base corpus' });
    const base = (await (await fetch(`${url}/api/benches/${bench}/corpora`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': first.contentType }, body: new Uint8Array(first.body) })).json()) as { id: string; alphabet: string[] };
    const run = (await api<{ id: string }>(url, 'POST', `/benches/${bench}/runs`, ssmRunBody(base.id, 'Crash run'), token)).body.id;

    const acked = { corpora: [] as { id: string; types: number }[], batches: [] as number[], checkpoints: [] as string[] };
    let stop = false;
    const uploads = (async () => {
      for (let k = 1; !stop; k++) {
        const form = multipart({ name: `c${k}.tsv`, bytes: corpusText(k, 3000) }, { name: `Corpus ${k}` });
        try {
          const res = await fetch(`${url}/api/benches/${bench}/corpora`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': form.contentType }, body: new Uint8Array(form.body) });
          if (res.status === 201) acked.corpora.push((await res.json()) as { id: string; types: number });
        } catch {
          return;
        }
      }
    })();
    const metrics = (async () => {
      for (let b = 0; !stop; b++) {
        const points = Array.from({ length: 200 }, (_, i) => ({ series: 'train_bound', step: b * 200 + i, value: 3 - i / 1000 }));
        try {
          const res = await api(url, 'POST', `/benches/${bench}/runs/${run}/metrics`, { points }, token);
          if (res.status === 201) acked.batches.push(b);
        } catch {
          return;
        }
      }
    })();
    const saves = (async () => {
      for (let s = 1; !stop; s++) {
        try {
          const res = await fetch(`${url}/api/benches/${bench}/runs/${run}/checkpoints?reason=manual`, {
            method: 'POST',
            headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/octet-stream' },
            body: new Uint8Array(ssmCheckpointBytes(base.alphabet, { step: s })),
          });
          if (res.status === 201) acked.checkpoints.push(((await res.json()) as { id: string }).id);
        } catch {
          return;
        }
      }
    })();

    // Let writes stream for a while, then kill the server without warning.
    const deadline = Date.now() + 20_000;
    while (Date.now() < deadline && (acked.corpora.length < 2 || acked.batches.length < 5 || acked.checkpoints.length < 3)) {
      await new Promise((r) => setTimeout(r, 200));
    }
    server.child.kill('SIGKILL');
    stop = true;
    await Promise.all([uploads, metrics, saves]);
    await new Promise((r) => server.child.exitCode !== null || server.child.signalCode !== null ? r(null) : server.child.once('exit', r));
    expect(acked.corpora.length + acked.batches.length + acked.checkpoints.length).toBeGreaterThan(0);

    // Restart on the same database (recovery of the WAL happens on open), then stop it cleanly.
    const again = await startChildServer(env, { dir });
    const health = await api<{ ok: boolean }>(again.url, 'GET', '/health');
    expect(health.body.ok).toBe(true);
    await again.stop();

    const orm = await openDatabase(join(dir, 'load.sqlite'), { migrate: false });
    const sql = async <T>(text: string, params: unknown[] = []) => (await orm.em.fork().getConnection().execute(text, params)) as T[];
    try {
      expect(await sql<{ integrity_check: string }>('pragma integrity_check')).toEqual([{ integrity_check: 'ok' }]);
      // Every acknowledged corpus is there with all its words; no corpus is partial.
      for (const c of acked.corpora) {
        const [row] = await sql<{ n: number }>('select count(*) as n from corpus_words where corpus_id = ?', [c.id]);
        expect(Number(row!.n)).toBe(c.types);
      }
      expect(await sql('select c.id from corpora c where c.types <> (select count(*) from corpus_words w where w.corpus_id = c.id)')).toEqual([]);
      // Every acknowledged metric batch has its 200 points; every stored batch is whole.
      const perBatch = await sql<{ b: number; n: number }>("select step / 200 as b, count(*) as n from metric_points where run_id = ? and series = 'train_bound' group by step / 200", [run]);
      const stored = new Map(perBatch.map((r) => [Number(r.b), Number(r.n)]));
      for (const b of acked.batches) expect(stored.get(b)).toBe(200);
      for (const n of stored.values()) expect(n).toBe(200);
      // Every acknowledged checkpoint is there with its bytes.
      for (const id of acked.checkpoints) {
        const [row] = await sql<{ size: number }>('select length(bytes) as size from checkpoints where id = ?', [id]);
        expect(Number(row?.size ?? 0)).toBeGreaterThan(0);
      }
    } finally {
      await orm.close(true);
    }
  });
});
