import { DestroyRef, Injectable, OnDestroy, computed, effect, inject, signal, untracked } from '@angular/core';
import { proxy } from 'comlink';
import { ErrorCode } from '../../../shared/api/errors';
import type { RunDto } from '../../../shared/api/runs';
import { ApiError, messageOf } from '../core/api-error';
import { AuthStore } from '../core/auth-store';
import { TRAINER_FACTORY } from '../workers/trainer-client';
import type { TrainingOutcome, TrainingProgress } from '../workers/trainer-api';
import { LiveRun } from './live-run';
import { trainerSettingsOf, trainingSetOf } from './run-trainer-settings';
import { RunsApi } from './runs-api';
import {
  AT_END_NOTICE, FLUSH_AT_POINTS, FLUSH_EVERY_MS, LAST_SAMPLES_KEPT, MAX_BUFFERED_POINTS, SIGN_OUT_WAIT_MS, atLastStep, lockName, problemOf, type Slot,
} from './run-slot';

/**
 * Trains runs in this tab, one dedicated worker each, at most `limit` at once (hardware threads minus one, at
 * least one); the rest wait in a visible queue. Sends metric points in batches, autosaves checkpoints, keeps
 * the server's run status in step, and ends every worker (`releaseProxy` + `terminate`) when done or destroyed.
 */
@Injectable({ providedIn: 'root' })
export class RunScheduler implements OnDestroy {
  private readonly api = inject(RunsApi);
  private readonly auth = inject(AuthStore);
  private readonly factory = inject(TRAINER_FACTORY);
  private readonly slots = new Map<string, Slot>();
  private readonly version = signal(0);

  readonly limit = Math.max(1, (globalThis.navigator?.hardwareConcurrency ?? 2) - 1);

  constructor() {
    // Signing out stops this tab's runs first, while the token can still save their final checkpoints.
    const remove = this.auth.beforeSignOut(() => this.stopAll(SIGN_OUT_WAIT_MS));
    // A session that ends otherwise (a 401, a deleted account) stops them too; their last save may then fail.
    effect(() => {
      if (this.auth.token() === null) untracked(() => void this.stopAll(0));
    });
    inject(DestroyRef).onDestroy(remove);
  }
  /** Every run this tab knows about (active, waiting and ended in this session), newest first. */
  readonly runs = computed(() => { this.version(); return [...this.slots.values()].map((s) => s.live).reverse(); });
  readonly active = computed(() => this.runs().filter((r) => r.isActive));
  readonly waiting = computed(() => this.runs().filter((r) => r.state() === 'waiting'));

  live(runId: string): LiveRun | null {
    this.version();
    return this.slots.get(runId)?.live ?? null;
  }

  /**
   * Queues a run (fresh, or from a checkpoint); it starts as soon as a worker slot is free. A run that another
   * tab of this browser trains (it holds the run's Web Lock) is not queued: its live state says "elsewhere".
   * A run whose placement is `runners` is refused (the server's runners train it).
   */
  async enqueue(benchId: string, run: RunDto, fromCheckpointId: string | null = null): Promise<LiveRun> {
    // The server's runners train these; a tab only watches them (the run page follows their event stream).
    if (run.placement === 'runners') throw new Error('This run was sent to the runners: they train it, not this tab.');
    const existing = this.slots.get(run.id);
    if (existing && (existing.live.isActive || existing.live.state() === 'waiting')) return existing.live;
    const live = new LiveRun(benchId, run, fromCheckpointId);
    this.slots.delete(run.id);
    this.slots.set(run.id, {
      live, handle: null, buffer: [], lastFlush: performance.now(), saving: false, nextSave: 0, best: null, flushing: null,
      ending: false, saveWork: null, statusWork: null, sentStatus: null,
    });
    this.version.update((v) => v + 1);
    if (await this.heldElsewhere(run.id)) {
      this.markElsewhere(live);
      return live;
    }
    await this.api.update(benchId, run.id, { status: 'queued', statusReason: null }).catch(() => undefined);
    this.pump();
    return live;
  }

  /**
   * Pauses a run that trains in this tab. A run at its last step (or whose training loop has already returned)
   * is not paused: it finishes, and `notice` says so. A server that answers that the run already finished gets
   * the same notice, and the run is not marked paused.
   */
  async pause(runId: string): Promise<void> {
    const slot = this.slots.get(runId);
    if (!slot?.handle || slot.live.state() !== 'training') return;
    if (slot.ending || atLastStep(slot)) {
      slot.live.notice.set(AT_END_NOTICE);
      return;
    }
    await slot.handle.api.pause();
    if (slot.ending || !slot.handle) {
      slot.live.notice.set(AT_END_NOTICE);
      return;
    }
    slot.live.state.set('paused');
    slot.live.notice.set(null);
    await this.sendStatus(slot, 'paused');
  }

  async resume(runId: string): Promise<void> {
    const slot = this.slots.get(runId);
    if (!slot?.handle || slot.live.state() !== 'paused') return;
    await slot.handle.api.resume();
    if (slot.live.state() === 'paused') slot.live.state.set('training');
    await this.sendStatus(slot, 'training');
  }

  /** Sends a pause or resume after any status update still under way; `finish` waits for it in turn. */
  private async sendStatus(slot: Slot, status: 'training' | 'paused'): Promise<void> {
    const before = slot.statusWork;
    const work = (async () => {
      await before;
      if (slot.ending && status === 'paused') return;
      await this.flush(slot, { status });
    })();
    slot.statusWork = work;
    await work;
  }

  /**
   * Saves a checkpoint of a training or paused run now (reason "manual"). Resolves with the saved step; throws
   * with a sentence when the run is not training in this tab, a save is already under way, or the save failed.
   */
  async saveNow(runId: string): Promise<number> {
    const slot = this.slots.get(runId);
    const state = slot?.live.state();
    if (!slot?.handle || (state !== 'training' && state !== 'paused')) {
      throw new Error('Only a run that is training or paused in this tab can be saved now.');
    }
    if (slot.saving) throw new Error('A checkpoint of this run is being saved already; wait a moment.');
    slot.saving = true;
    const work = this.saveCheckpoint(slot, 'manual');
    slot.saveWork = work.catch(() => undefined);
    try {
      await work;
      return slot.live.lastSavedStep() ?? 0;
    } catch (error) {
      throw new Error(problemOf(error));
    } finally {
      slot.saving = false;
    }
  }

  async stop(runId: string): Promise<void> {
    const slot = this.slots.get(runId);
    if (!slot) return;
    if (slot.live.state() === 'waiting') {
      slot.live.state.set('stopped');
      await this.api.update(slot.live.benchId, runId, { status: 'stopped' }).catch(() => undefined);
      return;
    }
    if (!slot.handle || !slot.live.isActive) return;
    slot.live.state.set('stopping');
    await slot.handle.api.stop();
  }

  /** Stops every run of this tab (waiting ones at once) and waits up to `waitMs` for them to end. */
  async stopAll(waitMs: number): Promise<void> {
    const ids = [...this.slots.values()].filter((s) => s.live.isActive || s.live.state() === 'waiting').map((s) => s.live.id);
    await Promise.all(ids.map((id) => this.stop(id).catch(() => undefined)));
    const deadline = performance.now() + waitMs;
    while (performance.now() < deadline && [...this.slots.values()].some((s) => s.live.isActive)) {
      await new Promise((resolve) => setTimeout(resolve, 50));
    }
  }

  ngOnDestroy(): void {
    for (const slot of this.slots.values()) this.close(slot);
    this.slots.clear();
  }

  private pump(): void {
    const running = [...this.slots.values()].filter((s) => s.handle !== null || s.live.state() === 'starting').length;
    const next = [...this.slots.values()].find((s) => s.live.state() === 'waiting');
    if (!next || running >= this.limit) return;
    void this.launch(next).finally(() => this.pump());
    this.pump();
  }

  /** Trains the run while holding its Web Lock, so two tabs of one browser never train the same run at once. */
  private async launch(slot: Slot): Promise<void> {
    slot.live.state.set('starting'); // at once: `pump` counts starting runs
    const locks = globalThis.navigator?.locks;
    if (!locks) return this.train(slot);
    let held = false;
    await locks.request(lockName(slot.live.id), { ifAvailable: true }, async (lock) => {
      if (!lock) return;
      held = true;
      await this.train(slot);
    });
    if (!held) {
      this.markElsewhere(slot.live);
      this.close(slot);
    }
  }

  /** Whether another tab holds the run's lock (checked before the run is marked queued on the server). */
  private async heldElsewhere(runId: string): Promise<boolean> {
    const locks = globalThis.navigator?.locks;
    if (!locks) return false;
    const state = await locks.query().catch(() => null);
    return !!state?.held?.some((l) => l.name === lockName(runId));
  }

  private markElsewhere(live: LiveRun): void {
    live.state.set('elsewhere');
    live.problem.set('This run is training in another tab of this browser. Follow it there, or stop it there before training it here.');
  }

  private async train(slot: Slot): Promise<void> {
    const { live } = slot;
    const { benchId, run } = live;
    try {
      const settings = trainerSettingsOf(run);
      if (!run.corpus) throw new Error('The corpus of this run was deleted; it cannot be trained any more.');
      const [corpus, bytes] = await Promise.all([
        this.api.trainingSet(benchId, run.corpus.id),
        live.fromCheckpointId ? this.api.downloadCheckpoint(benchId, run.id, live.fromCheckpointId) : Promise.resolve(undefined),
      ]);
      slot.handle = this.factory();
      const info = await slot.handle.api.init(settings, trainingSetOf(run, corpus), bytes);
      live.engine.set(info);
      const every = run.settings.training?.checkpointEvery ?? 0;
      slot.nextSave = every > 0 ? (Math.floor(info.step / every) + 1) * every : Number.POSITIVE_INFINITY;
      // Curves restart from the checkpoint: points after its step belong to the abandoned continuation.
      await this.api.truncateMetrics(benchId, run.id, info.step).catch(() => undefined);
      live.state.set('training');
      await this.api.update(benchId, run.id, {
        status: 'training', statusReason: null, stepsDone: info.step,
        summary: { backend: info.backend, simd: info.simd, threads: info.threads, parameterCount: info.parameterCount },
      });
      slot.sentStatus = 'training';
      const outcome = await slot.handle.api.start(proxy((p: TrainingProgress) => this.onProgress(slot, p)));
      slot.ending = true;
      await this.finish(slot, outcome);
    } catch (error) {
      const problem = problemOf(error);
      live.problem.set(problem);
      live.state.set('failed');
      await this.api.update(benchId, run.id, { status: 'failed', statusReason: problem.slice(0, 500) }).catch(() => undefined);
    } finally {
      this.close(slot);
    }
  }

  private onProgress(slot: Slot, p: TrainingProgress): void {
    const { live } = slot;
    live.progress.set(p);
    if (p.evaluation && p.evaluation.samples.length > 0) live.samples.update((old) => [...p.evaluation!.samples, ...old].slice(0, 30));
    const e = p.evaluation;
    if (e && Number.isFinite(e.validationBitsPerChar)) {
      live.lastValidation.set({ step: e.step, bitsPerChar: e.validationBitsPerChar, bitsPerWord: e.validationBitsPerWord });
    }
    if (e && Number.isFinite(e.validationBitsPerChar) && (!slot.best || e.validationBitsPerChar < slot.best.bits)) {
      slot.best = { bits: e.validationBitsPerChar, step: e.step, bitsPerWord: e.validationBitsPerWord };
    }
    const points = LiveRun.pointsOf(p);
    live.points.next(points);
    slot.buffer.push(...points);
    // The last step gets the final save ("on stop") only, not an identical autosave beside it.
    if (p.step >= slot.nextSave && p.step < p.totalSteps && !slot.saving && !slot.ending) void this.autosave(slot, p.step);
    if (slot.buffer.length >= FLUSH_AT_POINTS || performance.now() - slot.lastFlush >= FLUSH_EVERY_MS) void this.flush(slot);
  }

  private async autosave(slot: Slot, step: number): Promise<void> {
    const every = slot.live.run.settings.training?.checkpointEvery ?? 0;
    slot.saving = true;
    slot.nextSave = (Math.floor(step / every) + 1) * every;
    const work = this.saveCheckpoint(slot, 'auto');
    slot.saveWork = work.catch(() => undefined);
    try {
      await work;
    } catch (error) {
      slot.live.problem.set(`Autosave failed: ${problemOf(error)}`);
    } finally {
      slot.saving = false;
    }
  }

  /** The worker encodes and sends the checkpoint itself: the page only gets the short answer. */
  private async saveCheckpoint(slot: Slot, reason: 'auto' | 'stop' | 'manual'): Promise<void> {
    if (!slot.handle) return;
    const p = slot.live.progress();
    const bound = p?.evaluation?.validationBitsPerChar ?? p?.trainBitsPerChar ?? undefined;
    const url = this.api.checkpointUploadUrl(slot.live.benchId, slot.live.id, reason, bound);
    const ck = await slot.handle.api.uploadCheckpoint({ url, token: this.auth.token() });
    slot.live.lastSavedStep.set(ck.step);
    slot.live.checkpointSaved.next(ck);
  }

  /** Sends buffered metric points and the run's progress (steps, summary, optional status). */
  private async flush(slot: Slot, extra: { status?: 'training' | 'paused' } = {}): Promise<void> {
    slot.lastFlush = performance.now();
    // One flush at a time: a new one waits for the one in flight (overlapping requests were cut off).
    const previous = slot.flushing;
    const current = (async () => {
      if (previous) await previous;
      await this.sendProgress(slot, extra);
    })();
    slot.flushing = current;
    try {
      await current;
    } finally {
      if (slot.flushing === current) slot.flushing = null;
    }
  }

  private async sendProgress(slot: Slot, extra: { status?: 'training' | 'paused' }): Promise<void> {
    const { live } = slot;
    const points = slot.buffer.splice(0);
    const p = live.progress();
    try {
      if (points.length > 0) {
        try {
          await this.api.addMetrics(live.benchId, live.id, { points });
        } catch (error) {
          // Not lost: the points go back to the front of the buffer and are sent with the next batch (the server
          // keys points by run, series and step, so a batch that did arrive after all is not doubled).
          slot.buffer.unshift(...points.slice(-MAX_BUFFERED_POINTS));
          throw error;
        }
      }
      let answer: RunDto | undefined;
      if (p) {
        answer = await this.api.update(live.benchId, live.id, {
          ...extra, stepsDone: p.step,
          summary: {
            // No training figure when no step was taken (closed form, or resumed at the last step): keep the stored one.
            ...(p.trainBitsPerChar !== null
              ? { lastBoundBitsPerChar: p.trainBitsPerChar, lastIsBound: p.isBound, wordsPerSecond: Math.max(0, p.wordsPerSecond) } : {}),
            ...(slot.best ? { bestValidationBitsPerChar: slot.best.bits, bestValidationStep: slot.best.step } : {}),
            ...(slot.best && Number.isFinite(slot.best.bitsPerWord) ? { bestValidationBitsPerWord: slot.best.bitsPerWord } : {}),
            ...(live.samples().length > 0 ? { lastSamples: live.samples().slice(0, LAST_SAMPLES_KEPT).map((w) => w.slice(0, 64)) } : {}),
          },
        });
      } else if (extra.status) {
        answer = await this.api.update(live.benchId, live.id, extra);
      }
      if (extra.status && answer?.status === 'finished') {
        // The server kept the run finished and ignored the late pause.
        live.notice.set(AT_END_NOTICE);
      } else if (extra.status) {
        slot.sentStatus = extra.status;
      }
    } catch (error) {
      if (extra.status === 'paused' && error instanceof ApiError && error.code === ErrorCode.RunStatusConflict) {
        live.notice.set(AT_END_NOTICE);
        return;
      }
      live.problem.set(`Could not save progress to the server: ${messageOf(error)}`);
    }
  }

  private async finish(slot: Slot, outcome: TrainingOutcome): Promise<void> {
    const { live } = slot;
    // Progress messages are throttled: show the step training really ended at.
    const last = live.progress();
    if (last && last.step !== outcome.step) live.progress.set({ ...last, step: outcome.step, evaluation: undefined });
    // One final checkpoint: wait for a save under way, and save again only when it was not of this very step.
    await slot.saveWork;
    if (live.lastSavedStep() !== outcome.step) {
      try {
        await this.saveCheckpoint(slot, 'stop');
      } catch (error) {
        live.problem.set(`The final checkpoint could not be saved: ${problemOf(error)}`);
      }
    }
    // A pause sent in the last moments must reach the server before the end does, and be undone by it.
    await slot.statusWork;
    if (live.state() === 'paused') {
      live.state.set('training');
      live.notice.set(AT_END_NOTICE);
    }
    await this.flush(slot);
    if (slot.sentStatus === 'paused') {
      await this.api.update(live.benchId, live.id, { status: 'training' }).catch(() => undefined);
      slot.sentStatus = 'training';
    }
    if (outcome.kind === 'failed') {
      live.problem.set(outcome.error.message);
      live.state.set('failed');
      await this.api.update(live.benchId, live.id, { status: 'failed', statusReason: outcome.error.message.slice(0, 500), stepsDone: outcome.step }).catch(() => undefined);
      return;
    }
    const status = outcome.kind === 'completed' ? 'finished' : 'stopped';
    live.state.set(status);
    await this.api.update(live.benchId, live.id, { status, stepsDone: outcome.step }).catch(() => undefined);
  }

  private close(slot: Slot): void {
    slot.handle?.close();
    slot.handle = null;
    this.version.update((v) => v + 1);
  }
}
