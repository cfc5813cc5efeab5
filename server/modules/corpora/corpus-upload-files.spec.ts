// An upload streams to a temporary file that is always removed — after a save, a preview, every refusal, a
// server fault and a client that leaves mid-upload — and a client that leaves while its corpus is analysed
// stops the analysis in the worker thread and stores nothing.
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { request as httpRequest, type ClientRequest } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { join } from 'node:path';
import seedrandom from 'seedrandom';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { cpuPool } from '../../workers/cpu-pool';
import { corpusRowCounts, upload } from './corpora-test-helpers';
import { STALE_UPLOAD_MS, UPLOAD_DIR_PREFIX, removeStaleUploads } from './corpus-upload';

let t: TestApp;
let f: BenchFixture;
let server: Server;
let base: string;
beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  server = t.app.listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(async () => {
  await new Promise((r) => server.close(r));
  await t.close();
});

/** The upload directories present now (each request makes one under UPLOAD_TEMP_DIR). */
const uploadDirs = () => (existsSync(t.config.uploadTempDir) ? readdirSync(t.config.uploadTempDir).filter((d) => d.startsWith(UPLOAD_DIR_PREFIX)) : []);

async function until(what: string, check: () => boolean, ms = 15_000): Promise<void> {
  const end = Date.now() + ms;
  while (!check()) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 5));
  }
}

/** An invented corpus of `n` distinct made-up words with counts (.tsv). */
function madeUpCorpus(n: number): Buffer {
  const rng = seedrandom(`upload-files-${n}`);
  const seen = new Set<string>();
  const lines = ['word\tcount'];
  while (seen.size < n) {
    let w = '';
    for (let i = 4 + Math.floor(rng() * 5); i > 0; i--) w += 'abcdefghijklmnopqrstuvwxyz'[Math.floor(rng() * 26)];
    if (seen.has(w)) continue;
    seen.add(w);
    lines.push(`${w}\t${1 + Math.floor(rng() * 20)}`);
  }
  return Buffer.from(`${lines.join('\n')}\n`);
}

/** A raw multipart POST whose body the test sends (and cuts) itself. */
function rawUpload(file: Buffer): { req: ClientRequest; head: Buffer; tail: Buffer; closed: Promise<void> } {
  const boundary = '----uploadfilesspec';
  const head = Buffer.from(
    `--${boundary}\r\nContent-Disposition: form-data; name="name"\r\n\r\nLeft early\r\n` +
      `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.tsv"\r\nContent-Type: text/plain\r\n\r\n`,
  );
  const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
  const req = httpRequest(`${base}/api/benches/${f.benchId}/corpora`, {
    method: 'POST',
    headers: {
      Authorization: `Bearer ${f.tokens.member}`,
      'Content-Type': `multipart/form-data; boundary=${boundary}`,
      'Content-Length': String(head.length + file.length + tail.length),
    },
  });
  const closed = new Promise<void>((resolve) => {
    req.on('error', () => resolve());
    req.on('close', () => resolve());
  });
  return { req, head, tail, closed };
}

describe('the upload file on disk', () => {
  it('is gone after a save, a preview, a bad file and bad form fields', async () => {
    const ok = await upload(t, f.benchId, f.tokens.member, { name: 'w.tsv', content: 'alba\t3\nbrin\t2\n' });
    expect(ok.status).toBe(201);
    expect(uploadDirs()).toEqual([]);
    const preview = await upload(t, f.benchId, f.tokens.member, { name: 'w.tsv', content: 'alba\t3\n' }, { preview: true });
    expect(preview.status).toBe(200);
    expect(uploadDirs()).toEqual([]);
    const bad = await upload(t, f.benchId, f.tokens.member, { name: 'w.tsv', content: 'alba\t3\nbrin\t-2\n' });
    expect(bad.status).toBe(422);
    expect(uploadDirs()).toEqual([]);
    const badOptions = await upload(t, f.benchId, f.tokens.member, { name: 'w.txt', content: 'alba\n' }, { options: { maxWordLength: -3 } });
    expect(badOptions.status).toBe(422);
    expect(uploadDirs()).toEqual([]);
    const noName = await upload(t, f.benchId, f.tokens.member, { name: 'w.txt', content: 'alba\n' }, { name: ' ' });
    expect(noName.status).toBe(422);
    expect(uploadDirs()).toEqual([]);
  });

  it('is gone after a server fault while the file is analysed', async () => {
    const spy = vi.spyOn(cpuPool, 'analyse').mockRejectedValueOnce(new Error('the worker thread crashed'));
    try {
      const before = await corpusRowCounts(t);
      const res = await upload(t, f.benchId, f.tokens.member, { name: 'w.txt', content: 'alba\nbrin\n' });
      expect(res.status).toBe(500);
      expect(t.takeServerErrors()).toHaveLength(1);
      expect(uploadDirs()).toEqual([]);
      expect(await corpusRowCounts(t)).toEqual(before);
    } finally {
      spy.mockRestore();
    }
  });

  it('is gone after a 413, which keeps its sentence', async () => {
    const small = await createTestApp({ MAX_UPLOAD_BYTES: '2048' });
    try {
      const g = await createBenchFixture(small);
      const res = await upload(small, g.benchId, g.tokens.member, { name: 'w.txt', content: 'abcdefg\n'.repeat(400) });
      expect(res.status).toBe(413);
      expect(res.body.error.message).toBe('The file is larger than the upload limit of 2 kB; split it or remove rare words, then upload it again.');
      expect(readdirSync(small.config.uploadTempDir).filter((d) => d.startsWith(UPLOAD_DIR_PREFIX))).toEqual([]);
    } finally {
      await small.close();
    }
  });

  it('is written while the body arrives and removed when the client leaves mid-upload', async () => {
    const before = await corpusRowCounts(t);
    const file = madeUpCorpus(60_000);
    const { req, head, closed } = rawUpload(file);
    req.write(head);
    req.write(file.subarray(0, file.length >> 1));
    // Half the file is on disk (not in memory): the directory holds a growing file.
    await until('the first half on disk', () => {
      const dirs = uploadDirs();
      const path = dirs[0] && join(t.config.uploadTempDir, dirs[0], 'upload');
      return !!path && existsSync(path) && statSync(path).size > 0;
    });
    req.destroy();
    await closed;
    await until('the directory to go', () => uploadDirs().length === 0);
    expect(await corpusRowCounts(t)).toEqual(before);
  });
});

describe('a client that leaves during the analysis', () => {
  it('stops the analysis in its worker thread, stores nothing and leaves no file; the next upload works', async () => {
    const before = await corpusRowCounts(t);
    const start = cpuPool.stats();
    const file = madeUpCorpus(350_000); // about 3.4 MB: its analysis takes well over a second
    const { req, head, tail, closed } = rawUpload(file);
    req.write(head);
    req.write(file);
    req.write(tail);
    await until('the analysis to start', () => cpuPool.stats().active > start.active);
    req.destroy();
    await closed;
    await until('the analysis to be cancelled', () => cpuPool.stats().cancelled > start.cancelled);
    const after = cpuPool.stats();
    expect(after.cancelled).toBe(start.cancelled + 1);
    expect(after.completed).toBe(start.completed);
    await until('the directory to go', () => uploadDirs().length === 0);
    expect(await corpusRowCounts(t)).toEqual(before);
    const next = await upload(t, f.benchId, f.tokens.member, { name: 'after.txt', content: 'alba\nbrin\n' });
    expect(next.status).toBe(201);
    expect(cpuPool.stats().completed).toBe(start.completed + 1);
  }, 60_000);
});

describe('upload directories left by a killed server', () => {
  it('are removed at start when older than an hour; fresh ones (another server may be reading them) and other folders stay', async () => {
    const root = mkdtempSync(join(tmpdir(), 'noisewright-stale-spec-'));
    try {
      const now = Date.now();
      for (const [name, ageMs] of [[`${UPLOAD_DIR_PREFIX}old`, STALE_UPLOAD_MS + 60_000], [`${UPLOAD_DIR_PREFIX}fresh`, 60_000], ['someone-else', STALE_UPLOAD_MS * 5]] as const) {
        mkdirSync(join(root, name));
        writeFileSync(join(root, name, 'upload'), 'alba\n');
        const at = (now - ageMs) / 1000;
        utimesSync(join(root, name), at, at);
      }
      expect(await removeStaleUploads(root, now)).toBe(1);
      expect(readdirSync(root).sort()).toEqual([`${UPLOAD_DIR_PREFIX}fresh`, 'someone-else']);
      expect(await removeStaleUploads(join(root, 'missing'), now)).toBe(0);
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  });
});
