import { Injectable, computed, inject, signal } from '@angular/core';
import { BenchSummary, roleAtLeast } from '../core/api-types';
import { ApiError, messageOf } from '../core/api-error';
import { BenchesApi } from './benches-api';

/**
 * The benches of the signed-in person (for the switcher in the top bar) and the bench being looked at.
 * Bench-scoped pages call `open(benchId)`; the shell shows `current()`.
 */
@Injectable({ providedIn: 'root' })
export class CurrentBench {
  private readonly api = inject(BenchesApi);
  private readonly listState = signal<BenchSummary[]>([]);
  private readonly currentState = signal<BenchSummary | null>(null);
  private readonly problemState = signal<string | null>(null);
  private readonly loadingState = signal(false);

  readonly benches = this.listState.asReadonly();
  readonly current = this.currentState.asReadonly();
  /** Why the current bench could not be opened (a sentence saying what to do), or null. */
  readonly problem = this.problemState.asReadonly();
  readonly loading = this.loadingState.asReadonly();
  readonly canManage = computed(() => {
    const bench = this.currentState();
    return bench !== null && roleAtLeast(bench.role, 'coach');
  });

  async refreshList(): Promise<BenchSummary[]> {
    const benches = await this.api.list();
    this.listState.set(benches);
    return benches;
  }

  /** Loads a bench by id and makes it current. Returns null (and sets `problem`) when it cannot be seen. */
  async open(benchId: string): Promise<BenchSummary | null> {
    const known = this.currentState();
    if (known?.id !== benchId) this.currentState.set(this.listState().find((b) => b.id === benchId) ?? null);
    this.problemState.set(null);
    this.loadingState.set(true);
    try {
      const bench = await this.api.get(benchId);
      this.currentState.set(bench);
      this.listState.update((list) => list.map((b) => (b.id === bench.id ? bench : b)));
      return bench;
    } catch (error) {
      this.currentState.set(null);
      this.problemState.set(
        error instanceof ApiError && error.status === 404
          ? 'This bench does not exist or you are not a member. Pick one of your benches or ask its owner for an invitation.'
          : messageOf(error),
      );
      return null;
    } finally {
      this.loadingState.set(false);
    }
  }

  /** After a rename. */
  replace(bench: BenchSummary): void {
    this.currentState.set(bench);
    this.listState.update((list) => list.map((b) => (b.id === bench.id ? bench : b)));
  }

  /** After leaving or deleting a bench, or on sign-out. */
  forget(benchId?: string): void {
    if (benchId === undefined) {
      this.listState.set([]);
      this.currentState.set(null);
      return;
    }
    this.listState.update((list) => list.filter((b) => b.id !== benchId));
    if (this.currentState()?.id === benchId) this.currentState.set(null);
  }
}
