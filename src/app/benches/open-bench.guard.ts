import { inject } from '@angular/core';
import type { CanActivateFn } from '@angular/router';
import { CurrentBench } from './current-bench';

/**
 * Makes the bench of a `benches/:benchId/…` route the current one (the shell shows it; pages read it). Runs on
 * every change of `benchId`, so bench pages do not each open their bench; it never blocks the navigation (a
 * bench that cannot be seen sets `CurrentBench.problem`, which the shell shows).
 */
export const openBenchGuard: CanActivateFn = (route) => {
  const benchId = route.paramMap.get('benchId');
  const bench = inject(CurrentBench);
  if (benchId && bench.current()?.id !== benchId) void bench.open(benchId);
  return true;
};
