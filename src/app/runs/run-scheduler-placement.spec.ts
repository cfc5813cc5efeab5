import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { RunDto } from '../../../shared/api/runs';
import { AuthStore } from '../core/auth-store';
import { TRAINER_FACTORY } from '../workers/trainer-client';
import { RunScheduler } from './run-scheduler';
import { RunsApi } from './runs-api';

const RUN = {
  id: 'run-2', benchId: 'b1', corpus: { id: 'c1', name: 'Syllables' }, createdBy: null, name: 'On a runner', family: 'ngram',
  settings: { model: { order: 3 }, training: { checkpointEvery: 0 } }, alphabet: ['a', 'b'], status: 'queued', statusReason: null,
  summary: {}, stepsDone: 0, archived: false, checkpointCount: 0, canControl: true, placement: 'runners', runner: null, live: null,
  createdAt: '2026-12-01T00:00:00Z', updatedAt: '2026-12-01T00:00:00Z',
} as unknown as RunDto;

describe('RunScheduler and runner runs', () => {
  it('never trains a run sent to the runners', async () => {
    const factory = vi.fn();
    const api = { update: vi.fn(async () => RUN), trainingSet: vi.fn(), truncateMetrics: vi.fn(), addMetrics: vi.fn() };
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        { provide: RunsApi, useValue: api },
        { provide: AuthStore, useValue: { token: signal('token-1'), beforeSignOut: () => () => undefined } },
        { provide: TRAINER_FACTORY, useValue: factory },
      ],
    });
    const scheduler = TestBed.inject(RunScheduler);
    await expect(scheduler.enqueue('b1', RUN)).rejects.toThrow(/sent to the runners/);
    expect(scheduler.live('run-2')).toBeNull();
    expect(scheduler.waiting()).toHaveLength(0);
    expect(factory).not.toHaveBeenCalled();
    expect(api.update).not.toHaveBeenCalled(); // the server's status stays the runners'
    expect(api.trainingSet).not.toHaveBeenCalled();
  });
});
