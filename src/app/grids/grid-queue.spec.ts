import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { GridDto } from '../../../shared/api/grids';
import { RunScheduler } from '../runs/run-scheduler';
import { RunsApi } from '../runs/runs-api';
import { GridQueue } from './grid-queue';

const cell = (id: string, status: string) => ({
  coords: [0], values: [8], label: id, figure: null, best: null, final: null, wordsPerSecond: null, parameterCount: null,
  run: { id, name: id, family: 'gru', status, stepsDone: 0, archived: false },
});

function setUp() {
  const enqueue = vi.fn(async () => undefined);
  const runs = {
    get: vi.fn(async (_b: string, id: string) => ({ id, status: 'queued', canControl: true, placement: 'tab' })),
    checkpoints: vi.fn(async () => []),
  };
  TestBed.configureTestingModule({
    providers: [provideZonelessChangeDetection(), { provide: RunsApi, useValue: runs }, { provide: RunScheduler, useValue: { enqueue, live: () => null } }],
  });
  return { queue: TestBed.inject(GridQueue), enqueue };
}

describe('GridQueue', () => {
  it('picks up the unfinished runs of a grid that trains in tabs', async () => {
    const { queue, enqueue } = setUp();
    const grid = { placement: 'tab', cells: [cell('r1', 'queued'), cell('r2', 'finished'), cell('r3', 'paused')] } as unknown as GridDto;
    expect(queue.orphans(grid)).toEqual(['r1', 'r3']);
    expect(await queue.pickUp('b1', grid)).toBe(2);
    expect(enqueue).toHaveBeenCalledTimes(2);
  });

  it('never picks up the runs of a grid sent to the runners', async () => {
    const { queue, enqueue } = setUp();
    const grid = { placement: 'runners', cells: [cell('r1', 'queued'), cell('r3', 'training')] } as unknown as GridDto;
    expect(queue.orphans(grid)).toEqual([]);
    expect(await queue.pickUp('b1', grid)).toBe(0);
    expect(enqueue).not.toHaveBeenCalled();
  });
});
