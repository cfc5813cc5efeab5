/**
 * One change at a time per run: every status change of a run (a PATCH from a tab, a runner's progress or
 * finish, a control request) runs inside `withRunLock(runId, ...)` and re-reads the run first, so two
 * requests that race (a pause arriving while the run finishes) are decided one after the other against the
 * stored state. The server is the only writer of its SQLite file, so an in-process lock suffices.
 */
const tails = new Map<string, Promise<unknown>>();

export async function withRunLock<T>(runId: string, work: () => Promise<T>): Promise<T> {
  const before = tails.get(runId) ?? Promise.resolve();
  const result = before.then(work, work);
  const tail = result.catch(() => undefined);
  tails.set(runId, tail);
  try {
    return await result;
  } finally {
    if (tails.get(runId) === tail) tails.delete(runId);
  }
}
