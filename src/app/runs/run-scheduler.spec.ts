import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { RunDto } from '../../../shared/api/runs';
import { AuthStore } from '../core/auth-store';
import type { TrainerHandle } from '../workers/trainer-client';
import { TRAINER_FACTORY } from '../workers/trainer-client';
import { ApiError } from '../core/api-error';
import type { CheckpointUploadTarget, TrainingOutcome, TrainingProgress } from '../workers/trainer-api';
import { RunScheduler } from './run-scheduler';
import { RunsApi } from './runs-api';

const RUN = {
  id: 'run-1', benchId: 'b1', corpus: { id: 'c1', name: 'Syllables' }, createdBy: null, name: 'Little one', family: 'ngram',
  settings: { model: { order: 3 }, training: { checkpointEvery: 0 } }, alphabet: ['a', 'b'], status: 'created', statusReason: null,
  summary: {}, stepsDone: 0, archived: false, checkpointCount: 0, canControl: true, placement: 'tab', runner: null, live: null, createdAt: '2026-12-01T00:00:00Z', updatedAt: '2026-12-01T00:00:00Z',
} as unknown as RunDto;

const progressAt = (step: number, totalSteps: number) =>
  ({ step, totalSteps, trainBitsPerChar: 3, isBound: true, wordsPerSecond: 100, etaSeconds: 5 }) as unknown as TrainingProgress;

/** A fake worker: training runs until `stop`; checkpoints are "uploaded" by recording the target. */
function fakeWorker() {
  let end: (o: TrainingOutcome) => void = () => {};
  let onProgress: (p: TrainingProgress) => void = () => {};
  let savedStep = 7;
  const uploads: CheckpointUploadTarget[] = [];
  let failNext: string | null = null;
  const handle = {
    api: {
      init: vi.fn(async () => ({ backend: 'wasm', simd: true, threads: 1, parameterCount: 10, step: 0 })),
      start: vi.fn((cb: (p: TrainingProgress) => void) => new Promise<TrainingOutcome>((resolve) => { end = resolve; onProgress = cb; })),
      pause: vi.fn(async () => undefined),
      resume: vi.fn(async () => undefined),
      stop: vi.fn(async () => end({ kind: 'stopped', step: 7 })),
      uploadCheckpoint: vi.fn(async (target: CheckpointUploadTarget) => {
        if (failNext) { const e = new Error(failNext); e.name = 'UPLOAD_FAILED'; failNext = null; throw e; }
        uploads.push(target);
        return { id: `ck-${uploads.length}`, step: savedStep };
      }),
    },
    close: vi.fn(),
  } as unknown as TrainerHandle;
  return {
    handle, uploads, failWith: (m: string) => { failNext = m; },
    /** Reports progress at `step` of `total`, as the worker's loop does. */
    progress: (step: number, total: number) => { savedStep = step; onProgress(progressAt(step, total)); },
    complete: (step: number) => { savedStep = step; end({ kind: 'completed', step }); },
  };
}

function setUp() {
  const worker = fakeWorker();
  const signOutHooks: (() => Promise<void>)[] = [];
  const auth = { token: signal<string | null>('token-1'), beforeSignOut: (hook: () => Promise<void>) => { signOutHooks.push(hook); return () => undefined; } };
  const api = {
    update: vi.fn(async (..._args: unknown[]) => RUN),
    trainingSet: vi.fn(async () => ({ alphabet: ['a', 'b'], words: ['ab', 'ba'], counts: [2, 1], splits: ['train', 'validation'] })),
    truncateMetrics: vi.fn(async () => undefined),
    addMetrics: vi.fn(async () => undefined),
    checkpointUploadUrl: (benchId: string, runId: string, reason: string) => `http://example.test/api/benches/${benchId}/runs/${runId}/checkpoints?reason=${reason}`,
  };
  TestBed.configureTestingModule({
    providers: [
      provideZonelessChangeDetection(),
      { provide: RunsApi, useValue: api },
      { provide: AuthStore, useValue: auth },
      { provide: TRAINER_FACTORY, useValue: () => worker.handle },
    ],
  });
  return { scheduler: TestBed.inject(RunScheduler), worker, auth, signOutHooks, api };
}

const until = async (check: () => boolean) => {
  for (let i = 0; i < 100 && !check(); i++) await new Promise((r) => setTimeout(r, 5));
  expect(check()).toBe(true);
};

describe('RunScheduler checkpoints', () => {
  it('saves a checkpoint now through the worker, with reason "manual" and the signed-in token', async () => {
    const { scheduler, worker } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    await expect(scheduler.saveNow('run-1')).resolves.toBe(7);
    expect(worker.uploads).toEqual([{ url: 'http://example.test/api/benches/b1/runs/run-1/checkpoints?reason=manual', token: 'token-1' }]);
    expect(live.lastSavedStep()).toBe(7);
    await scheduler.stop('run-1');
    await until(() => live.state() === 'stopped');
    // Stopping at the step just saved keeps that one checkpoint instead of storing an identical second one.
    expect(worker.uploads.map((u) => u.url)).toEqual([expect.stringMatching(/reason=manual$/)]);
  });

  it('passes the worker’s sentence on when a save fails', async () => {
    const { scheduler, worker } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    worker.failWith('The server did not store the checkpoint: The run is archived.');
    await expect(scheduler.saveNow('run-1')).rejects.toThrow('The server did not store the checkpoint: The run is archived.');
    await scheduler.stop('run-1');
  });

  it('refuses to save a run that is not training in this tab', async () => {
    const { scheduler } = setUp();
    await expect(scheduler.saveNow('run-404')).rejects.toThrow(/training or paused in this tab/);
  });
});

/** A stand-in for the browser's LockManager: names held by "another tab" plus the ones this tab takes. */
function fakeLocks(heldByOtherTab: string[]) {
  const held = new Set(heldByOtherTab);
  return {
    held,
    request: async (name: string, _opts: unknown, body: (lock: { name: string } | null) => Promise<void>) => {
      if (held.has(name)) return body(null);
      held.add(name);
      try { return await body({ name }); } finally { held.delete(name); }
    },
    query: async () => ({ held: [...held].map((name) => ({ name })) }),
  };
}

describe('RunScheduler across tabs (Web Locks)', () => {
  afterEach(() => { vi.unstubAllGlobals(); });

  it('leaves a run alone when another tab of the browser trains it', async () => {
    vi.stubGlobal('navigator', { ...navigator, locks: fakeLocks(['noisewright-run:run-1']) });
    const { scheduler, worker } = setUp();
    const api = TestBed.inject(RunsApi) as unknown as { update: ReturnType<typeof vi.fn> };
    const live = await scheduler.enqueue('b1', RUN);
    expect(live.state()).toBe('elsewhere');
    expect(live.problem()).toMatch(/another tab/);
    expect(worker.handle.api.init).not.toHaveBeenCalled();
    expect(api.update).not.toHaveBeenCalled(); // the server status stays the other tab's
  });

  it('holds the run’s lock while it trains and lets go when it stops', async () => {
    const locks = fakeLocks([]);
    vi.stubGlobal('navigator', { ...navigator, locks });
    const { scheduler } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    expect(locks.held.has('noisewright-run:run-1')).toBe(true);
    await scheduler.stop('run-1');
    await until(() => live.state() === 'stopped');
    await until(() => !locks.held.has('noisewright-run:run-1'));
  });
});

describe('RunScheduler and the end of a session', () => {
  it('stops the runs and saves their checkpoints before signing out', async () => {
    const { scheduler, worker, signOutHooks } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    expect(signOutHooks.length).toBe(1);
    await signOutHooks[0]!();
    expect(live.state()).toBe('stopped');
    expect(worker.uploads.map((u) => u.url)).toEqual([expect.stringMatching(/reason=stop$/)]);
    expect(worker.uploads[0]?.token).toBe('token-1');
  });

  it('stops the runs when the session ends otherwise (the token is gone)', async () => {
    const { scheduler, worker, auth } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    auth.token.set(null);
    TestBed.tick();
    await until(() => live.state() === 'stopped');
    expect(worker.handle.api.stop).toHaveBeenCalled();
  });
});

describe('RunScheduler at the end of a run', () => {
  const statuses = (api: { update: ReturnType<typeof vi.fn> }) =>
    api.update.mock.calls.map((c) => (c[2] as { status?: string }).status).filter((x) => x !== undefined);

  it('does not pause a run at its last step: it finishes, with a notice and no "paused" sent', async () => {
    const { scheduler, worker, api } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    worker.progress(300, 300);
    await scheduler.pause('run-1');
    expect(worker.handle.api.pause).not.toHaveBeenCalled();
    expect(live.notice()).toMatch(/last step/);
    worker.complete(300);
    await until(() => live.state() === 'finished');
    expect(statuses(api)).not.toContain('paused');
    expect(statuses(api).at(-1)).toBe('finished');
  });

  it('undoes a pause that the worker took just before its loop returned, so the server ends finished', async () => {
    const { scheduler, worker, api } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    worker.progress(299, 300);
    await scheduler.pause('run-1'); // accepted: the run is at step 299
    expect(live.state()).toBe('paused');
    worker.complete(300); // the loop had one more step in hand and returned
    await until(() => live.state() === 'finished');
    const sent = statuses(api);
    expect(sent.slice(-3)).toEqual(['paused', 'training', 'finished']);
    expect(live.notice()).toMatch(/nothing to pause/);
  });

  it('shows a notice, not a failure, when the server says the run already finished', async () => {
    const { scheduler, worker, api } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    worker.progress(10, 300);
    api.update.mockImplementationOnce(async () => { throw new ApiError(409, 'RUN_STATUS_CONFLICT', 'A run that is finished cannot become paused.', {}); });
    await scheduler.pause('run-1');
    expect(live.notice()).toMatch(/already reached its last step/);
    expect(live.problem()).toBeNull();
    await scheduler.stop('run-1');
  });

  it('saves one final checkpoint when the last step is also an autosave step', async () => {
    const { scheduler, worker } = setUp();
    const live = await scheduler.enqueue('b1', { ...RUN, settings: { ...RUN.settings, training: { checkpointEvery: 100 } } } as RunDto);
    await until(() => live.state() === 'training');
    worker.progress(100, 200);
    await until(() => worker.uploads.length === 1);
    worker.progress(200, 200);
    worker.complete(200);
    await until(() => live.state() === 'finished');
    expect(worker.uploads.map((u) => new URL(u.url).searchParams.get('reason'))).toEqual(['auto', 'stop']);
  });

  it('keeps the last samples in the run summary, so a reload can show them', async () => {
    const { scheduler, worker, api } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    live.samples.set(['ab', 'ba']);
    worker.progress(5, 10);
    worker.complete(10);
    await until(() => live.state() === 'finished');
    const summaries = api.update.mock.calls.map((c) => (c[2] as { summary?: { lastSamples?: string[] } }).summary?.lastSamples).filter(Boolean);
    expect(summaries.at(-1)).toEqual(['ab', 'ba']);
  });

  it('keeps the latest validation figures in bits/char and bits/word for the page', async () => {
    const { scheduler, worker } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    const p = { ...progressAt(40, 80), evaluation: { step: 40, validationBitsPerChar: 2.5, validationBitsPerWord: 15, observationEntropyBits: null, noiseInformationBits: null, samples: [] } };
    (worker.handle.api.start as unknown as { mock: { calls: [(x: TrainingProgress) => void][] } }).mock.calls[0]![0](p as TrainingProgress);
    expect(live.lastValidation()).toEqual({ step: 40, bitsPerChar: 2.5, bitsPerWord: 15 });
    await scheduler.stop('run-1');
  });
});

describe('RunScheduler metric batches', () => {
  type Batch = { points: { series: string; step: number }[] };
  const sentBatches = (api: { addMetrics: ReturnType<typeof vi.fn> }) => api.addMetrics.mock.calls.map((c) => (c as unknown[])[2] as Batch);

  it('keeps the points of a batch that did not arrive and sends them with the next one, each once', async () => {
    const { scheduler, worker, api } = setUp();
    const live = await scheduler.enqueue('b1', RUN);
    await until(() => live.state() === 'training');
    worker.progress(10, 300);
    // The connection drops while the first batch is on its way (status 0: no answer at all).
    api.addMetrics.mockImplementationOnce(async () => { throw new ApiError(0, 'NETWORK', 'The server could not be reached.', {}); });
    await scheduler.pause('run-1');
    expect(live.problem()).toMatch(/Could not save progress/);
    await scheduler.resume('run-1');
    worker.progress(20, 300);
    await scheduler.stop('run-1');
    await until(() => live.state() === 'stopped');

    const batches = sentBatches(api);
    expect(batches.length).toBeGreaterThanOrEqual(2);
    const failed = batches[0]!.points;
    expect(failed.map((p) => p.step)).toContain(10);
    const delivered = batches.slice(1).flatMap((b) => b.points);
    // Every point of the lost batch is sent again, the new ones too, and no (series, step) twice.
    for (const p of failed) expect(delivered).toContainEqual(p);
    expect(delivered.map((p) => p.step)).toContain(20);
    const keys = delivered.map((p) => `${p.series}@${p.step}`);
    expect(new Set(keys).size).toBe(keys.length);
  });
});
