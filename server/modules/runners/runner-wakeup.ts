/**
 * Wakes runner claims that wait for work (`POST /api/runner/claim` with `waitSeconds`, the embedded back-end's
 * long poll). The server calls `notify()` whenever work may be there for a runner: a run became queued for
 * runners (create, resume, requeue, a lease that ran out) or an evaluation request started waiting. `close()` at
 * shutdown ends every wait at once and every later one before it starts, so held claims never delay the stop.
 * In-process only: with BullMQ (QUEUE_URL) runners consume the queue and never wait here.
 */

/** Why a wait ended: work may be there, the time ran out, the client went away, or the server is shutting down. */
export type WakeReason = 'work' | 'timeout' | 'gone' | 'closed';

export class RunnerWakeup {
  /** Counts notifications, so work notified between a claim and the wait that follows it is not missed. */
  private generation = 0;
  private closed = false;
  private readonly waiters = new Set<(reason: WakeReason) => void>();

  /** A mark to take before claiming; `waitAfter(mark, …)` ends at once when work was notified since. */
  mark(): number {
    return this.generation;
  }

  /** Work may be there: every waiting claim wakes (and claims again). */
  notify(): void {
    this.generation++;
    for (const wake of [...this.waiters]) wake('work');
  }

  /** Ends every wait now and every later one at once (the server is shutting down). */
  close(): void {
    this.closed = true;
    for (const wake of [...this.waiters]) wake('closed');
  }

  /** Claims waiting now. */
  get waiting(): number {
    return this.waiters.size;
  }

  /** Waits until work is notified after `mark`, `ms` pass, `signal` aborts (the client went away) or `close()`. */
  waitAfter(mark: number, ms: number, signal?: AbortSignal): Promise<WakeReason> {
    if (this.closed) return Promise.resolve('closed');
    if (this.generation !== mark) return Promise.resolve('work');
    if (signal?.aborted) return Promise.resolve('gone');
    return new Promise((resolve) => {
      const onAbort = () => done('gone');
      const timer = setTimeout(() => done('timeout'), ms);
      const done = (reason: WakeReason) => {
        clearTimeout(timer);
        signal?.removeEventListener('abort', onAbort);
        this.waiters.delete(done);
        resolve(reason);
      };
      this.waiters.add(done);
      signal?.addEventListener('abort', onAbort, { once: true });
    });
  }
}
