import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { RunDto } from '../../../shared/api/runs';
import { AuthStore } from '../core/auth-store';
import { RunsApi } from '../runs/runs-api';
import { EVENT_FETCH, LiveEvents, RunnerWatch } from './live-events';
import type { StreamFetch } from './run-events';

const RUN = { id: 'run-1', status: 'queued', stepsDone: 0, live: null, placement: 'runners' } as unknown as RunDto;

function setUp() {
  const encoder = new TextEncoder();
  const streams: ReadableStreamDefaultController<Uint8Array>[] = [];
  const urls: string[] = [];
  const fetch: StreamFetch = async (url) => {
    urls.push(url);
    const body = new ReadableStream<Uint8Array>({ start: (c) => { streams.push(c); } });
    return { ok: true, status: 200, body };
  };
  TestBed.configureTestingModule({
    providers: [
      provideZonelessChangeDetection(),
      { provide: EVENT_FETCH, useValue: fetch },
      { provide: AuthStore, useValue: { token: signal('tok') } },
      { provide: RunsApi, useValue: {} },
    ],
  });
  const write = (text: string) => streams.at(-1)!.enqueue(encoder.encode(text));
  return { events: TestBed.inject(LiveEvents), write, urls };
}

describe('LiveEvents', () => {
  afterEach(() => vi.useRealTimers());

  it('applies a run stream to the watch at most once a second', async () => {
    vi.useFakeTimers();
    const { events, write, urls } = setUp();
    const watch = events.watchRun('b 1', RUN);
    const batches: number[][] = [];
    watch.points.subscribe((p) => batches.push(p.map((x) => x.step)));
    const changed: string[] = [];
    watch.statusChanged.subscribe((r) => changed.push(r.status));
    await vi.advanceTimersByTimeAsync(0);
    expect(urls).toEqual(['/api/benches/b%201/runs/run-1/events']);
    write(`event: run\ndata: ${JSON.stringify({ ...RUN, status: 'training' })}\n\n`);
    await vi.advanceTimersByTimeAsync(0);
    expect(watch.run().status).toBe('training');
    expect(changed).toEqual(['training']);
    // Five progress events and two metric batches within one second: one update at the end of the second.
    for (let i = 1; i <= 5; i++) {
      write(`event: progress\ndata: ${JSON.stringify({ step: i * 10, steps: 100, stepsPerSecond: 5, etaSeconds: 1, bitsPerChar: 3, isBound: true, runnerName: 'box', updatedAt: '' })}\n\n`);
      if (i % 2 === 0) write(`event: metrics\ndata: ${JSON.stringify({ points: [{ series: 'train_bound', step: i * 10, value: 3 }] })}\n\n`);
      await vi.advanceTimersByTimeAsync(100);
    }
    expect(watch.progress()).toBeNull();
    await vi.advanceTimersByTimeAsync(600);
    expect(watch.progress()?.step).toBe(50);
    expect(batches).toEqual([[20, 40]]);
    watch.close();
  });

  it('hands a bench stream over as the latest state of each changed run', async () => {
    vi.useFakeTimers();
    const { events, write, urls } = setUp();
    const got: RunDto[][] = [];
    const handle = events.watchBench('b1', (runs) => got.push(runs));
    await vi.advanceTimersByTimeAsync(0);
    expect(urls).toEqual(['/api/benches/b1/events']);
    write(`event: run\ndata: ${JSON.stringify({ id: 'a', stepsDone: 1 })}\n\n`);
    await vi.advanceTimersByTimeAsync(0);
    write(`event: run\ndata: ${JSON.stringify({ id: 'a', stepsDone: 2 })}\n\nevent: run\ndata: ${JSON.stringify({ id: 'b', stepsDone: 5 })}\n\n`);
    write(`event: run\ndata: ${JSON.stringify({ id: 'a', stepsDone: 3 })}\n\n`);
    await vi.advanceTimersByTimeAsync(1000);
    expect(got.map((batch) => batch.map((r) => `${r.id}:${r.stepsDone}`))).toEqual([['a:1'], ['a:3', 'b:5']]);
    handle.close();
  });

  it('tells the bench page at once when a run was deleted, and not as a changed run', async () => {
    vi.useFakeTimers();
    const { events, write } = setUp();
    const got: RunDto[][] = [];
    const gone: string[] = [];
    const handle = events.watchBench('b1', (runs) => got.push(runs), { onDeleted: (d) => gone.push(`${d.id} by ${d.deletedBy}`) });
    await vi.advanceTimersByTimeAsync(0);
    write(`event: deleted\ndata: ${JSON.stringify({ id: 'a', benchId: 'b1', name: 'Old', deletedBy: 'Ada' })}\n\n`);
    await vi.advanceTimersByTimeAsync(0);
    expect(gone).toEqual(['a by Ada']);
    await vi.advanceTimersByTimeAsync(1000);
    expect(got).toEqual([]);
    handle.close();
  });

  it('marks a watched run as deleted', () => {
    const watch = new RunnerWatch({ id: 'r1', status: 'stopped' } as RunDto);
    expect(watch.deleted()).toBeNull();
    watch.apply([{ event: 'deleted', id: null, data: JSON.stringify({ id: 'r1', benchId: 'b1', name: 'Old', deletedBy: 'Ada' }) }]);
    expect(watch.deleted()).toEqual({ id: 'r1', benchId: 'b1', name: 'Old', deletedBy: 'Ada' });
    watch.close();
  });
});
