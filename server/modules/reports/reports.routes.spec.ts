import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { EvaluationDto } from '../../../shared/api/evaluations';
import type { GridDto } from '../../../shared/api/grids';
import type { ReportDto, ReportFigure, ReportPage } from '../../../shared/api/reports';
import type { CheckpointDto, RunDto } from '../../../shared/api/runs';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { ssmResultsFixture } from '../evaluations/evaluation-test-fixture';
import { createRun, ssmCheckpointBytes, ssmRunBody, uploadCorpus } from '../runs/runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let runA: RunDto;
let runB: RunDto;
let evaluation: EvaluationDto;
let corpusId: string;

const api = () => request(t.app);
const reportsUrl = () => `/api/benches/${f.benchId}/reports`;

/**
 * A small reader for RFC 4180 ("Common Format and MIME Type for CSV Files", section 2), written here apart
 * from the writer: records end with CRLF, fields are separated by commas, a field in double quotes may hold
 * commas, line breaks and doubled quotes ("").
 */
function readCsv(text: string): string[][] {
  const records: string[][] = [];
  let field = '';
  let fields: string[] = [];
  let i = 0;
  let quoted = false;
  while (i < text.length) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') { field += '"'; i += 2; continue; }
      if (ch === '"') { quoted = false; i++; continue; }
      field += ch; i++; continue;
    }
    if (ch === '"') { quoted = true; i++; continue; }
    if (ch === ',') { fields.push(field); field = ''; i++; continue; }
    if (ch === '\r' && text[i + 1] === '\n') { fields.push(field); records.push(fields); fields = []; field = ''; i += 2; continue; }
    field += ch; i++;
  }
  if (field !== '' || fields.length > 0) { fields.push(field); records.push(fields); }
  return records;
}

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  const corpus = await uploadCorpus(t, f.benchId, f.tokens.member);
  corpusId = corpus.id;
  // A name with a comma and quotes, so the CSV must quote and escape it.
  runA = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Tiny, "quoted" SSM'));
  runB = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpus.id, 'Second SSM'));
  const ck = (await api().post(`/api/benches/${f.benchId}/runs/${runA.id}/checkpoints?reason=manual`).set(bearer(f.tokens.member))
    .set('Content-Type', 'application/octet-stream').send(Buffer.from(ssmCheckpointBytes(corpus.alphabet, { step: 120 })))).body as CheckpointDto;
  evaluation = (await api().post(`/api/benches/${f.benchId}/runs/${runA.id}/checkpoints/${ck.id}/evaluations`).set(bearer(f.tokens.member))
    .send({ settings: { K: 256 }, results: ssmResultsFixture() })).body as EvaluationDto;
  await api().patch(`/api/benches/${f.benchId}/runs/${runB.id}`).set(bearer(f.tokens.member))
    .send({ status: 'training', summary: { lastBoundBitsPerChar: 2.875, bestValidationBitsPerChar: 2.5, parameterCount: 321, wordsPerSecond: 45.5 } }).expect(200);
  await api().post(`/api/benches/${f.benchId}/runs/${runB.id}/metrics`).set(bearer(f.tokens.member))
    .send({ points: [{ series: 'valid_bound', step: 10, value: 3 }, { series: 'valid_bound', step: 20, value: 2.5 }] }).expect(201);
});
afterAll(async () => t.close());

describe('reports', () => {
  let report: ReportDto;

  it('freezes an evaluation in a report with a stable link that a viewer can open', async () => {
    const res = await api().post(reportsUrl()).set(bearer(f.tokens.member)).send({ kind: 'evaluation', title: 'Tiny SSM, step 120', sourceIds: [evaluation.id] });
    expect(res.status).toBe(201);
    report = res.body as ReportDto;
    expect(report.link).toBe(`/benches/${f.benchId}/reports/${report.id}`);
    expect(report.snapshot.evaluation!.results).toEqual(evaluation.results);
    const bitsPerChar = report.snapshot.figures.find((x) => x.section === 'held-out' && x.name === 'bits per char (bound)')!;
    expect(bitsPerChar.value).toBe(2.3);
    const read = await api().get(`${reportsUrl()}/${report.id}`).set(bearer(f.tokens.viewer));
    expect(read.body).toEqual(report);
    const list = (await api().get(reportsUrl()).set(bearer(f.tokens.viewer))).body as ReportPage;
    expect(list.items.map((r) => r.id)).toEqual([report.id]);
    expect(list.total).toBe(1);
  });

  it('exports CSV that parses back to the same values as the JSON export', async () => {
    const json = await api().get(`${reportsUrl()}/${report.id}/export.json`).set(bearer(f.tokens.viewer));
    expect(json.status).toBe(200);
    expect(json.headers['content-disposition']).toMatch(/^attachment; filename="?tiny-ssm-step-120\.json"?$/); // RFC 6266: a token or a quoted string
    const figures = (JSON.parse(json.text) as ReportDto).snapshot.figures;
    const csv = await api().get(`${reportsUrl()}/${report.id}/export.csv`).set(bearer(f.tokens.viewer));
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    const rows = readCsv(csv.text);
    expect(rows[0]).toEqual(['section', 'name', 'setting', 'value', 'unit']);
    expect(rows).toHaveLength(figures.length + 1);
    rows.slice(1).forEach((r, i) => {
      const x = figures[i]!;
      expect(r).toHaveLength(5);
      expect([r[0], r[1], r[2], r[4]]).toEqual([x.section, x.name, x.setting, x.unit]);
      if (typeof x.value === 'number') expect(Number(r[3])).toBe(x.value);
      else expect(r[3]).toBe(x.value);
    });
    expect(rows.some((r) => r[2]!.includes('Tiny, "quoted" SSM'))).toBe(true);
  });

  it('freezes a comparison with the runs’ figures and curves, and a grid with its cells', async () => {
    const cmp = await api().post(reportsUrl()).set(bearer(f.tokens.member)).send({ kind: 'comparison', title: 'Two runs', sourceIds: [runB.id, runA.id] });
    expect(cmp.status).toBe(201);
    const snap = (cmp.body as ReportDto).snapshot;
    expect(snap.runs!.map((r) => r.id)).toEqual([runB.id, runA.id]);
    expect(snap.curves![runB.id]!['valid_bound']).toEqual({ steps: [10, 20], values: [3, 2.5] });
    const best = snap.figures.find((x: ReportFigure) => x.setting === 'Second SSM' && x.name === 'best validation bound')!;
    expect(best.value).toBe(2.5);
    // The run with an evaluation brings its held-out cost and standard error; the other has no evaluation rows.
    expect(snap.evaluations![runA.id]!.heldOutBitsPerChar).toBe(2.3);
    expect(snap.figures.find((x: ReportFigure) => x.section === 'latest evaluation' && x.setting === runA.name && /bits per char$/.test(x.name))!.value).toBe(2.3);
    expect(snap.figures.filter((x: ReportFigure) => x.section === 'latest evaluation' && x.setting === 'Second SSM')).toEqual([]);

    const grid = (await api().post(`/api/benches/${f.benchId}/grids`).set(bearer(f.tokens.member)).send({
      name: 'Sizes', corpusId, family: 'gru',
      baseSettings: { model: { embeddingSize: 4, observationHidden: 0 }, training: { steps: 10, batchSize: 4, learningRate: 0.01 } },
      axes: [{ key: 'model.stateSize', values: [8, 16] }],
    })).body as GridDto;
    const g = await api().post(reportsUrl()).set(bearer(f.tokens.member)).send({ kind: 'grid', title: 'Sizes grid', sourceIds: [grid.id] });
    expect(g.status).toBe(201);
    const gs = (g.body as ReportDto).snapshot;
    expect(gs.grid!.cells).toHaveLength(2);
    expect(gs.figures.filter((x) => x.name === 'status').map((x) => x.value)).toEqual(['queued', 'queued']);
  });

  it('refuses unknown sources and viewers, storing nothing', async () => {
    const before = await countRows(t, 'reports');
    const unknown = await api().post(reportsUrl()).set(bearer(f.tokens.member)).send({ kind: 'evaluation', title: 'Ghost', sourceIds: ['3f1c2a4e-8b7d-4c6a-9e2f-1a2b3c4d5e6f'] });
    expect(unknown.status).toBe(422);
    expect(unknown.body.error.fields.sourceIds).toMatch(/evaluation of this bench/);
    const two = await api().post(reportsUrl()).set(bearer(f.tokens.member)).send({ kind: 'grid', title: 'Two', sourceIds: [runA.id, runB.id] });
    expect(two.status).toBe(422);
    const viewer = await api().post(reportsUrl()).set(bearer(f.tokens.viewer)).send({ kind: 'comparison', title: 'Mine', sourceIds: [runA.id] });
    expect(viewer.status).toBe(403);
    expect(await countRows(t, 'reports')).toBe(before);
  });

  it('lets only the creator, coaches and owners delete a report', async () => {
    const del = await api().delete(`${reportsUrl()}/${report.id}`).set(bearer(f.tokens.viewer));
    expect(del.status).toBe(403);
    const ok = await api().delete(`${reportsUrl()}/${report.id}`).set(bearer(f.tokens.coach));
    expect(ok.status).toBe(204);
    expect((await api().get(`${reportsUrl()}/${report.id}`).set(bearer(f.tokens.viewer))).status).toBe(404);
  });
});

describe('report CSV and spreadsheet formulas', () => {
  it('exports a run named like a formula as text: =HYPERLINK(...) becomes \'=HYPERLINK(...)', async () => {
    // OWASP, "CSV Injection": cells beginning with =, +, -, @, tab or CR get a leading single quote.
    const evil = '=HYPERLINK("http://example.org/x","open me")';
    const run = await createRun(t, f.benchId, f.tokens.member, ssmRunBody(corpusId, evil));
    const cmp = await api().post(reportsUrl()).set(bearer(f.tokens.member)).send({ kind: 'comparison', title: '@risky title', sourceIds: [run.id] });
    expect(cmp.status).toBe(201);
    // The stored snapshot keeps the name as typed; only the CSV cell is guarded.
    expect((cmp.body as ReportDto).snapshot.figures.some((x) => x.setting === evil)).toBe(true);
    const csv = await api().get(`${reportsUrl()}/${cmp.body.id}/export.csv`).set(bearer(f.tokens.viewer));
    expect(csv.status).toBe(200);
    const rows = readCsv(csv.text).slice(1);
    const settings = rows.map((r) => r[2]!);
    expect(settings).toContain(`'${evil}`);
    expect(settings).not.toContain(evil);
    // The raw text holds the guarded cell quoted, never a bare =HYPERLINK at a field start.
    expect(csv.text).toContain('"\'=HYPERLINK(""http://example.org/x"",""open me"")"');
    expect(csv.text).not.toMatch(/(^|,)=HYPERLINK/m);
    // Every value cell that was a number in the snapshot still reads back as that number.
    const figures = (cmp.body as ReportDto).snapshot.figures;
    rows.forEach((r, i) => {
      const x = figures[i]!;
      if (typeof x.value === 'number') expect(Number(r[3])).toBe(x.value);
    });
  });
});

describe('listing reports', () => {
  it('pages the reports newest first, with the total', async () => {
    const before = ((await api().get(reportsUrl()).set(bearer(f.tokens.viewer))).body as ReportPage).total;
    const made: string[] = [];
    for (const title of ['Older', 'Middle', 'Newest']) {
      t.clock.advance(60_000);
      const res = await api().post(reportsUrl()).set(bearer(f.tokens.member)).send({ kind: 'comparison', title, sourceIds: [runB.id] });
      expect(res.status).toBe(201);
      made.push(res.body.id as string);
    }
    const first = (await api().get(`${reportsUrl()}?limit=2&offset=0`).set(bearer(f.tokens.viewer))).body as ReportPage;
    expect(first.total).toBe(before + 3);
    expect(first.items.map((r) => r.title)).toEqual(['Newest', 'Middle']);
    expect(first.items[0]).toMatchObject({ id: made[2], kind: 'comparison', link: `/benches/${f.benchId}/reports/${made[2]}` });
    expect(first.items[0]!.createdBy?.id).toBe(f.userIds.member);
    expect(first.items[0]).not.toHaveProperty('snapshot');
    const second = (await api().get(`${reportsUrl()}?limit=2&offset=2`).set(bearer(f.tokens.viewer))).body as ReportPage;
    expect(second.items[0]!.title).toBe('Older');
    expect(second.items.length).toBe(Math.min(2, before + 1));
    const dates = [...first.items, ...second.items].map((r) => Date.parse(r.createdAt));
    expect(dates).toEqual([...dates].sort((a, b) => b - a));
  });

  it('refuses a bad page size and hides the list from people outside the bench', async () => {
    const bad = await api().get(`${reportsUrl()}?limit=0&offset=-1`).set(bearer(f.tokens.viewer));
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['limit', 'offset']);
    // Project rule (DEVELOPERS.md, architecture): a non-member gets 404, so the bench's existence is not revealed.
    const outsider = await api().get(reportsUrl()).set(bearer(f.tokens.outsider));
    expect(outsider.status).toBe(404);
    expect(outsider.body).not.toHaveProperty('items');
    const anonymous = await api().get(reportsUrl());
    expect(anonymous.status).toBe(401);
  });
});
