import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ErrorCode } from '../../../shared/api/errors';
import type { CreateGridRequest, GridDto, GridSummaryDto } from '../../../shared/api/grids';
import type { RunDto, RunPage, SsmRunSettings } from '../../../shared/api/runs';
import { bearer, countRows, createBenchFixture, createTestApp, type BenchFixture, type TestApp } from '../../testing/test-app';
import { tinySsmModel, tinyTraining, uploadCorpus } from '../runs/runs-test-helpers';

let t: TestApp;
let f: BenchFixture;
let corpusId: string;

beforeAll(async () => {
  t = await createTestApp();
  f = await createBenchFixture(t);
  corpusId = (await uploadCorpus(t, f.benchId, f.tokens.member)).id;
});
afterAll(async () => t.close());

const api = () => request(t.app);
const gridsUrl = () => `/api/benches/${f.benchId}/grids`;

const flows = [[{ kind: 'diag' }], [{ kind: 'shift' }, { kind: 'coupling' }]];
const gridBody = (over: Partial<CreateGridRequest> = {}): CreateGridRequest => ({
  name: 'Flows by size',
  corpusId,
  family: 'ssm',
  baseSettings: { model: { ...tinySsmModel }, training: { ...tinyTraining } },
  axes: [
    { key: 'model.generativeFlow', values: flows as CreateGridRequest['axes'][number]['values'] },
    { key: 'model.stateSize', values: [8, 16] },
  ],
  figure: 'bestValidationBitsPerChar',
  ...over,
});

async function allRuns(): Promise<RunDto[]> {
  return ((await api().get(`/api/benches/${f.benchId}/runs?archived=all&limit=200`).set(bearer(f.tokens.viewer))).body as RunPage).items;
}

describe('creating a grid', () => {
  let grid: GridDto;

  it('makes one queued run per cell with the cell values applied to the base settings', async () => {
    const res = await api().post(gridsUrl()).set(bearer(f.tokens.member)).send(gridBody());
    expect(res.status).toBe(201);
    grid = res.body as GridDto;
    expect(grid.cellCount).toBe(4);
    expect(grid.cells.map((c) => c.coords)).toEqual([[0, 0], [0, 1], [1, 0], [1, 1]]);
    expect(grid.progress).toEqual({ queued: 4 });
    expect(grid.done).toBe(false);
    const runs = await allRuns();
    expect(runs).toHaveLength(4);
    for (const cell of grid.cells) {
      const run = runs.find((r) => r.id === cell.run!.id)!;
      const s = run.settings as SsmRunSettings;
      expect(run.status).toBe('queued');
      expect(s.model.generativeFlow).toEqual(flows[cell.coords[0]!]);
      expect(s.model.stateSize).toBe([8, 16][cell.coords[1]!]);
      // Everything not on an axis comes from the base settings.
      expect(s.model.inferenceFlow).toEqual(tinySsmModel.inferenceFlow);
      expect(s.training.learningRate).toBe(tinyTraining.learningRate);
      expect(run.name).toContain(cell.label);
    }
    expect(grid.cells[3]!.label).toBe('Generative flow: shift + coupling, State size 16');
  });

  it('shows a run’s reported figure in its cell and lists the grid', async () => {
    const cell = grid.cells[1]!;
    await api().patch(`/api/benches/${f.benchId}/runs/${cell.run!.id}`).set(bearer(f.tokens.member))
      .send({ status: 'training', summary: { bestValidationBitsPerChar: 2.75, lastBoundBitsPerChar: 2.9, wordsPerSecond: 120 } }).expect(200);
    const read = (await api().get(`${gridsUrl()}/${grid.id}`).set(bearer(f.tokens.viewer))).body as GridDto;
    expect(read.cells[1]).toMatchObject({ figure: 2.75, best: 2.75, final: 2.9, wordsPerSecond: 120 });
    expect(read.cells[0]!.figure).toBeNull();
    expect(read.progress).toEqual({ queued: 3, training: 1 });
    const list = (await api().get(gridsUrl()).set(bearer(f.tokens.viewer))).body as GridSummaryDto[];
    expect(list.map((g) => g.id)).toEqual([grid.id]);
  });

  it('refuses to delete a grid while one of its runs trains, then archives its runs', async () => {
    const busy = await api().delete(`${gridsUrl()}/${grid.id}`).set(bearer(f.tokens.member));
    expect(busy.status).toBe(409);
    expect(busy.body.error.code).toBe(ErrorCode.RunStatusConflict);
    expect(await countRows(t, 'grids')).toBe(1);
    await api().patch(`/api/benches/${f.benchId}/runs/${grid.cells[1]!.run!.id}`).set(bearer(f.tokens.member)).send({ status: 'paused' }).expect(200);
    const viewer = await api().delete(`${gridsUrl()}/${grid.id}`).set(bearer(f.tokens.viewer));
    expect(viewer.status).toBe(403);
    const done = await api().delete(`${gridsUrl()}/${grid.id}`).set(bearer(f.tokens.member));
    expect(done.status).toBe(204);
    expect(await countRows(t, 'grids')).toBe(0);
    const runs = await allRuns();
    expect(runs).toHaveLength(4);
    expect(runs.every((r) => r.archived && r.status === 'stopped')).toBe(true);
  });
});

describe('refusing grids', () => {
  it('refuses a grid of 65 cells with 422 and stores nothing', async () => {
    const before = { grids: await countRows(t, 'grids'), runs: await countRows(t, 'runs') };
    const res = await api().post(gridsUrl()).set(bearer(f.tokens.member)).send(gridBody({
      axes: [{ key: 'training.seed', values: [1, 2, 3, 4, 5] }, { key: 'model.flowHidden', values: [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13] }],
    }));
    expect(res.status).toBe(422);
    expect(res.body.error.fields.axes).toMatch(/at most 64 cells/);
    expect({ grids: await countRows(t, 'grids'), runs: await countRows(t, 'runs') }).toEqual(before);
  });

  it('refuses four axes and a cell whose settings a run cannot take, naming the cell', async () => {
    const before = await countRows(t, 'runs');
    const four = await api().post(gridsUrl()).set(bearer(f.tokens.member)).send(gridBody({
      axes: ['training.seed', 'model.flowHidden', 'model.encoderSize', 'model.proposalHidden'].map((key) => ({ key, values: [1, 2] })),
    }));
    expect(four.status).toBe(422);
    expect(four.body.error.fields.axes).toMatch(/at most 3 axes/);
    const bad = await api().post(gridsUrl()).set(bearer(f.tokens.member)).send(gridBody({ axes: [{ key: 'model.stateSize', values: [4, 0] }] }));
    expect(bad.status).toBe(422);
    expect(bad.body.error.fields['baseSettings.model.stateSize']).toMatch(/cell State size 0/);
    expect(await countRows(t, 'runs')).toBe(before);
  });

  it('does not let a viewer start a grid or a learnability check (403)', async () => {
    const before = { grids: await countRows(t, 'grids'), runs: await countRows(t, 'runs') };
    const grid = await api().post(gridsUrl()).set(bearer(f.tokens.viewer)).send(gridBody());
    expect(grid.status).toBe(403);
    expect(grid.body.error.code).toBe(ErrorCode.RoleTooLow);
    const check = await api().post(`/api/benches/${f.benchId}/corpora/${corpusId}/learnability`).set(bearer(f.tokens.viewer)).send({ budgetSteps: 50 });
    expect(check.status).toBe(403);
    expect({ grids: await countRows(t, 'grids'), runs: await countRows(t, 'runs') }).toEqual(before);
  });
});
