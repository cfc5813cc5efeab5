/**
 * The in-process bus every run change is published on (status, steps, summary, live progress, metric
 * points, deletion), read by the server-sent event streams of runners-events.routes.ts. Events carry the bench id, so a
 * stream subscribes to one bench and filters by run where it watches one run.
 */
import { EventEmitter } from 'node:events';
import type { RunDeletedEvent, RunEventName, RunLiveProgress } from '../../../shared/api/runners';
import type { RunDto } from '../../../shared/api/runs';

export type RunEvent =
  | { name: 'run'; benchId: string; runId: string; data: RunDto }
  | { name: 'progress'; benchId: string; runId: string; data: RunLiveProgress }
  | { name: 'metrics'; benchId: string; runId: string; data: { points: { series: string; step: number; value: number }[] } }
  | { name: 'deleted'; benchId: string; runId: string; data: RunDeletedEvent };

export class RunEventBus {
  private readonly emitter = new EventEmitter();

  constructor() {
    // One listener per open stream; many browser tabs may watch one bench.
    this.emitter.setMaxListeners(0);
  }

  publish(event: RunEvent): void {
    this.emitter.emit(event.benchId, event);
  }

  /** Calls `listener` for every event of the bench until the returned function is called. */
  subscribe(benchId: string, listener: (event: RunEvent) => void): () => void {
    this.emitter.on(benchId, listener);
    return () => {
      this.emitter.off(benchId, listener);
    };
  }

  /** Open subscriptions of a bench (tests check that a closed stream leaves none behind). */
  listenerCount(benchId: string): number {
    return this.emitter.listenerCount(benchId);
  }
}

export type { RunEventName };
