import { Injectable, InjectionToken, inject, signal, type WritableSignal } from '@angular/core';
import { Subject } from 'rxjs';
import type { RunDeletedEvent, RunLiveProgress } from '../../../shared/api/runners';
import { KNOWN_METRIC_SERIES, type RunDto } from '../../../shared/api/runs';
import { AuthStore } from '../core/auth-store';
import type { CurvePoint } from '../runs/live-run';
import { RunsApi } from '../runs/runs-api';
import { Coalescer, openEventStream, type EventStreamHandle, type StreamEvent, type StreamFetch, type StreamState } from './run-events';

/** The fetch the event streams use (tests swap in fake streams). */
export const EVENT_FETCH = new InjectionToken<StreamFetch>('fetch for server-sent event streams', {
  providedIn: 'root',
  factory: () => (url, init) => globalThis.fetch(url, init),
});

/** The page renders stream updates at most this often (the app keeps the main thread light). */
export const RENDER_EVERY_MS = 1000;
const enc = encodeURIComponent;

function parse<T>(data: string): T | null {
  try {
    return JSON.parse(data) as T;
  } catch {
    return null;
  }
}

/**
 * A runner run followed live: its DTO, its latest progress and its new curve points, updated from the run's event
 * stream (polling when the stream cannot be held open) at most once a second. `close()` ends the stream.
 */
export class RunnerWatch {
  readonly run: WritableSignal<RunDto>;
  readonly progress: WritableSignal<RunLiveProgress | null>;
  readonly connection = signal<StreamState>('connecting');
  /** New curve points (the curves component draws them on its own schedule). */
  readonly points = new Subject<CurvePoint[]>();
  /** The stream opened again after a drop: points may have been missed, reload the history. */
  readonly reopened = new Subject<void>();
  /** Emits the run when its status changed (the page then reloads its checkpoints). */
  readonly statusChanged = new Subject<RunDto>();
  /** Set when someone deleted the run (the stream's `deleted` event). */
  readonly deleted = signal<RunDeletedEvent | null>(null);
  private stream: EventStreamHandle | null = null;

  constructor(initial: RunDto) {
    this.run = signal(initial);
    this.progress = signal(initial.live);
  }

  attach(stream: EventStreamHandle): void { this.stream = stream; }

  /** Applies a batch of events (run, progress, metrics) in one go. */
  apply(events: StreamEvent[]): void {
    let run: RunDto | null = null;
    let progress: RunLiveProgress | null = null;
    const points: CurvePoint[] = [];
    for (const e of events) {
      if (e.event === 'deleted') this.deleted.set(parse<RunDeletedEvent>(e.data));
      else if (e.event === 'run') run = parse<RunDto>(e.data) ?? run;
      else if (e.event === 'progress') progress = parse<RunLiveProgress>(e.data) ?? progress;
      else if (e.event === 'metrics') points.push(...(parse<{ points: CurvePoint[] }>(e.data)?.points ?? []));
    }
    // A stream carries one DTO for every watcher: the caller's own right to control the run stays the one the
    // REST answer gave (per person).
    if (run) this.setRun({ ...run, canControl: this.run().canControl });
    if (progress) this.progress.set(progress);
    if (points.length > 0) this.points.next(points);
  }

  setRun(run: RunDto): void {
    const before = this.run().status;
    this.run.set(run);
    if (run.live && (!this.progress() || run.live.updatedAt >= this.progress()!.updatedAt)) this.progress.set(run.live);
    if (run.status !== before) this.statusChanged.next(run);
  }

  close(): void {
    this.stream?.close();
    this.points.complete();
    this.reopened.complete();
    this.statusChanged.complete();
  }
}

/** Opens the server-sent event streams of runs and benches with the signed-in person's token. */
@Injectable({ providedIn: 'root' })
export class LiveEvents {
  private readonly auth = inject(AuthStore);
  private readonly fetch = inject(EVENT_FETCH);
  private readonly runs = inject(RunsApi);

  /** Follows one run trained by runners (`GET …/runs/:runId/events`); polls the run and its new points as a fallback. */
  watchRun(benchId: string, run: RunDto): RunnerWatch {
    const watch = new RunnerWatch(run);
    const coalescer = new Coalescer<StreamEvent>((events) => watch.apply(events), RENDER_EVERY_MS);
    let lastStep = -1;
    const poll = async () => {
      const [fresh, page] = await Promise.all([
        this.runs.get(benchId, run.id), this.runs.metrics(benchId, run.id, [...KNOWN_METRIC_SERIES], lastStep),
      ]);
      const points: CurvePoint[] = [];
      for (const [series, s] of Object.entries(page.series)) s.steps.forEach((step, i) => points.push({ series, step, value: s.values[i]! }));
      if (points.length > 0) lastStep = Math.max(lastStep, ...points.map((p) => p.step));
      watch.setRun(fresh);
      if (points.length > 0) watch.points.next(points);
    };
    const stream = openEventStream({
      url: `/api/benches/${enc(benchId)}/runs/${enc(run.id)}/events`,
      token: () => this.auth.token(),
      fetch: this.fetch,
      onEvent: (e) => {
        if (e.event === 'metrics') {
          const steps = parse<{ points: CurvePoint[] }>(e.data)?.points.map((p) => p.step) ?? [];
          if (steps.length > 0) lastStep = Math.max(lastStep, ...steps);
        }
        coalescer.add(e);
      },
      onState: (s) => watch.connection.set(s),
      onReopen: () => watch.reopened.next(),
      poll,
    });
    watch.attach({ close: () => { coalescer.dispose(); stream.close(); }, get state() { return stream.state; } });
    return watch;
  }

  /**
   * Follows a bench's run changes (`GET /api/benches/:benchId/events`): `onRuns` gets the latest DTO of every run that
   * changed, at most once a second; `onDeleted` hears of a deleted run at once. `poll` is the fallback while the stream cannot be held open.
   */
  watchBench(
    benchId: string,
    onRuns: (runs: RunDto[]) => void,
    options: { poll?: () => Promise<void> | void; onState?: (s: StreamState) => void; onDeleted?: (run: RunDeletedEvent) => void } = {},
  ): EventStreamHandle {
    const coalescer = new Coalescer<RunDto>((runs) => {
      const latest = new Map<string, RunDto>();
      for (const r of runs) latest.set(r.id, r);
      onRuns([...latest.values()]);
    }, RENDER_EVERY_MS);
    const stream = openEventStream({
      url: `/api/benches/${enc(benchId)}/events`,
      token: () => this.auth.token(),
      fetch: this.fetch,
      onEvent: (e) => {
        if (e.event === 'deleted') {
          const gone = parse<RunDeletedEvent>(e.data);
          if (gone) options.onDeleted?.(gone);
          return;
        }
        if (e.event !== 'run') return;
        const run = parse<RunDto>(e.data);
        if (run) coalescer.add(run);
      },
      onState: options.onState,
      onReopen: () => void options.poll?.(),
      poll: options.poll,
    });
    return { close: () => { coalescer.dispose(); stream.close(); }, get state() { return stream.state; } };
  }
}
