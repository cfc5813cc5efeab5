/**
 * The business rules of runs, next to the repository: creating a run (with its placement), the status
 * machine of shared/api/runs.ts and its activity log, archiving and deleting. Route handlers validate the
 * request and call this service; runner routes (server/modules/runners) use the same status rules.
 *
 * Race-free status changes: every change runs under the run's lock (run-lock.ts) against the stored state.
 * A run that finished, stopped or failed stays so: a pause or stop that arrives after it (from a tab or a
 * runner) changes nothing and is answered with the unchanged run and a `message`.
 */
import type { EntityManager } from '@mikro-orm/core';
import { ErrorCode } from '../../../shared/api/errors';
import type { RunPlacement } from '../../../shared/api/runners';
import { ACTIVE_RUN_STATUSES, RUN_TRANSITIONS, canMoveRun, type RunFamily, type RunSettings, type RunStatus, type RunSummary } from '../../../shared/api/runs';
import type { AppContext } from '../../app-context';
import { conflict, validationFailed } from '../../http-error';
import { ActivityRepository } from '../activity/activity.repository';
import type { Bench } from '../benches/bench.entity';
import { Corpus } from '../corpora/corpus.entity';
import { publishRun, queueForRunners } from '../runners/run-queueing';
import type { User } from '../users/user.entity';
import { withRunLock } from './run-lock';
import { Run } from './run.entity';
import { RunRepository } from './run.repository';
import { corpusSplit, FAMILY_LABELS } from './run-settings';

/**
 * Writes a new run, queued, with its corpus's alphabet and (unless the settings name one) the corpus's split, and
 * its activity line; the caller flushes. `RunService.create` after its checks, and the demo seed.
 */
export function addNewRun(em: EntityManager, input: {
  bench: Bench; me: User; corpus: Corpus; name: string; family: RunFamily; settings: RunSettings; placement: RunPlacement; at: Date;
}): Run {
  const { bench, me, corpus, at } = input;
  const run = new RunRepository(em).create({
    bench, corpus, createdBy: me, name: input.name, family: input.family, settings: { ...input.settings, split: input.settings.split ?? corpusSplit(corpus) } as RunSettings,
    alphabet: corpus.alphabet.slice(), status: 'queued', placement: input.placement, at,
  });
  const where = input.placement === 'runners' ? ' and sent it to the runners' : '';
  new ActivityRepository(em).record(bench, me, 'run.created',
    `${me.displayName} created the run "${run.name}" (${FAMILY_LABELS[run.family]}) on the corpus "${corpus.name}"${where}.`, at);
  return run;
}

export const END_STATUSES: readonly RunStatus[] = ['finished', 'stopped', 'failed'];

/** The answer of a change: the run, and a sentence when the request changed nothing on purpose. */
export interface RunChange {
  run: Run;
  message?: string;
}

export function transitionRefusal(from: RunStatus, to: RunStatus): string {
  const allowed = RUN_TRANSITIONS[from];
  const hint =
    from === 'queued' && to === 'paused'
      ? 'it has not started yet; start it or stop it instead.'
      : to === 'finished' && from !== 'training'
        ? 'only a run that is training can finish.'
        : to === 'paused'
          ? 'only a run that is training can be paused.'
          : `from ${from} it can become ${allowed.join(', ')}.`;
  return `A run that is ${from} cannot become ${to}: ${hint}`;
}

/** The message of a pause or stop that came after the run ended (a no-op, not an error). */
export function lateRequestMessage(run: Run, to: RunStatus): string {
  const verb = to === 'paused' ? 'pause' : 'stop';
  return `"${run.name}" had already ${run.status === 'failed' ? 'failed' : run.status === 'finished' ? 'finished' : 'been stopped'} at step ${run.stepsDone}; the ${verb} came after that and changed nothing.`;
}

export interface StatusChange {
  status: RunStatus;
  statusReason?: string | null;
  stepsDone?: number;
  summary?: RunSummary;
  /** Who asked (null: a runner). */
  actor: User | null;
}

export class RunService {
  constructor(
    private readonly ctx: AppContext,
    private readonly em: EntityManager = ctx.orm.em,
  ) {}

  private get runs(): RunRepository {
    return new RunRepository(this.em);
  }

  /** Runs `work` under the run's lock with the run re-read from the database first. */
  async locked<T>(run: Run, work: (run: Run) => Promise<T>): Promise<T> {
    return withRunLock(run.id, async () => {
      await this.em.refresh(run, { populate: ['runner'] });
      return work(run);
    });
  }

  async create(input: {
    bench: Bench;
    me: User;
    corpusId: string;
    name: string;
    family: RunFamily;
    settings: RunSettings;
    placement: RunPlacement;
  }): Promise<Run> {
    const { bench, me } = input;
    const corpus = await this.em.findOne(Corpus, { id: input.corpusId, bench });
    if (!corpus) throw validationFailed({ corpusId: 'Choose a corpus of this bench; this one does not exist here (it may have been deleted).' });
    if (corpus.alphabet.length + 1 > 4096) {
      throw validationFailed({ corpusId: `This corpus has ${corpus.alphabet.length} different characters; models take at most 4095. Restrict its alphabet first.` });
    }
    const settings = { ...input.settings, split: input.settings.split ?? corpusSplit(corpus) } as RunSettings;
    const ownSplit = JSON.stringify(settings.split) === JSON.stringify(corpusSplit(corpus));
    if (!(await this.runs.hasTrainingWords(corpus, settings.split!, ownSplit))) {
      throw validationFailed({
        [input.settings.split ? 'settings.split.shares' : 'corpusId']: 'No word of this corpus falls in the training split; raise the train share or choose another split seed.',
      });
    }
    const run = addNewRun(this.em, { bench, me, corpus, name: input.name, family: input.family, settings, placement: input.placement, at: this.ctx.clock.now() });
    await this.em.flush();
    await this.afterChange(run, null);
    return run;
  }

  /** `PATCH /runs/:runId`: name, status (through the machine), steps done and summary. */
  async update(run: Run, body: { name?: string; status?: RunStatus; statusReason?: string | null; stepsDone?: number; summary?: RunSummary }, me: User): Promise<RunChange> {
    return this.locked(run, async () => {
      const changesProgress = body.status !== undefined || body.summary !== undefined || body.stepsDone !== undefined;
      if (run.archived && changesProgress) {
        throw conflict(ErrorCode.RunStatusConflict, `"${run.name}" is archived; restore it from the archive before you train it or change its figures.`);
      }
      if (body.status !== undefined && this.isLate(run, body.status)) return { run, message: lateRequestMessage(run, body.status) };
      if (body.status !== undefined && run.placement === 'runners' && run.runner && run.status === 'training' && (body.status === 'paused' || body.status === 'stopped')) {
        return this.requestControl(run, body.status === 'paused' ? 'pause' : 'stop');
      }
      const now = this.ctx.clock.now();
      if (body.name !== undefined && body.name !== run.name) {
        new ActivityRepository(this.em).record(run.bench, me, 'run.renamed', `${me.displayName} renamed the run "${run.name}" to "${body.name}".`, now);
        run.name = body.name;
      }
      const before = run.status;
      if (body.status !== undefined) {
        this.applyStatus(run, { status: body.status, statusReason: body.statusReason, stepsDone: body.stepsDone, summary: body.summary, actor: me });
      } else {
        if (body.statusReason !== undefined) run.statusReason = body.statusReason?.trim() || null;
        this.applyFigures(run, body.stepsDone, body.summary);
      }
      run.updatedAt = now;
      await this.em.flush();
      await this.afterChange(run, before);
      return { run };
    });
  }

  /** Whether a pause or stop arrives after the run ended (answered as a no-op). */
  isLate(run: Run, to: RunStatus): boolean {
    return END_STATUSES.includes(run.status) && (to === 'paused' || to === 'stopped') && run.status !== to;
  }

  /**
   * Moves a run through the machine (call under `locked`; the caller flushes and calls `afterChange`).
   * 409 for a move the machine forbids. Releasing a runner run (any status but training) drops its lease.
   */
  applyStatus(run: Run, change: StatusChange): void {
    const from = run.status;
    const to = change.status;
    if (!canMoveRun(from, to)) throw conflict(ErrorCode.RunStatusConflict, transitionRefusal(from, to));
    const moved = to !== from;
    if (moved || change.statusReason !== undefined) run.statusReason = change.statusReason?.trim() || null;
    this.applyFigures(run, change.stepsDone, change.summary);
    if (moved && END_STATUSES.includes(to)) {
      const why = to === 'failed' && run.statusReason ? ` ${run.statusReason}` : '';
      const what = to === 'failed' ? 'failed' : `was ${to}`;
      new ActivityRepository(this.em).record(run.bench, change.actor, `run.${to}`, `The run "${run.name}" ${what} at step ${run.stepsDone}.${why}`, this.ctx.clock.now());
    }
    run.status = to;
    if (run.placement === 'runners' && to !== 'training') {
      run.runner = null;
      run.leaseExpiresAt = null;
      run.requestedControl = null;
    }
    run.updatedAt = this.ctx.clock.now();
  }

  private applyFigures(run: Run, stepsDone: number | undefined, summary: RunSummary | undefined): void {
    if (stepsDone !== undefined) run.stepsDone = stepsDone;
    if (summary !== undefined) {
      run.summary = { ...run.summary, ...summary };
      run.bestBoundBitsPerChar = run.summary.bestValidationBitsPerChar ?? null;
    }
  }

  /** Records a pause or stop for the runner holding the run; it acts within one progress interval. */
  async requestControl(run: Run, action: 'pause' | 'stop'): Promise<RunChange> {
    run.requestedControl = action;
    run.updatedAt = this.ctx.clock.now();
    await this.em.flush();
    await publishRun(this.ctx, this.em, run);
    const who = run.runner?.name ? `The runner "${run.runner.name}"` : 'The runner';
    return { run, message: `${who} saves a checkpoint and ${action === 'pause' ? 'pauses' : 'stops'} the run within a few seconds.` };
  }

  /** After a flushed change: queue or withdraw a runner run, and publish the change. */
  async afterChange(run: Run, before: RunStatus | null): Promise<void> {
    if (run.placement === 'runners' && run.status !== before) {
      if (run.status === 'queued') await queueForRunners(this.ctx, this.em, [run]);
      else if (before === 'queued' && run.status !== 'training') await this.ctx.runQueue.withdraw(run.id).catch(this.ctx.logError);
    }
    await publishRun(this.ctx, this.em, run);
  }

  async archive(run: Run, archived: boolean, me: User): Promise<Run> {
    return this.locked(run, async () => {
      if (archived && ACTIVE_RUN_STATUSES.includes(run.status)) {
        throw conflict(ErrorCode.RunStatusConflict, `"${run.name}" is ${run.status}; stop it before you archive it.`);
      }
      if (archived !== run.archived) {
        const now = this.ctx.clock.now();
        run.archived = archived;
        run.updatedAt = now;
        new ActivityRepository(this.em).record(run.bench, me, archived ? 'run.archived' : 'run.restored',
          `${me.displayName} ${archived ? 'archived' : 'restored from the archive'} the run "${run.name}".`, now);
        await this.em.flush();
        await publishRun(this.ctx, this.em, run);
      }
      return run;
    });
  }

  async remove(run: Run, me: User): Promise<void> {
    await this.locked(run, async () => {
      if (ACTIVE_RUN_STATUSES.includes(run.status)) {
        throw conflict(ErrorCode.RunStatusConflict, `"${run.name}" is ${run.status}; stop it before you delete it.`);
      }
      await this.em.transactional(async (em) => {
        // The database removes the run's metric points and checkpoints with it (ON DELETE CASCADE).
        await em.nativeDelete(Run, { id: run.id });
        new ActivityRepository(em).record(run.bench, me, 'run.deleted', `${me.displayName} deleted the run "${run.name}".`, this.ctx.clock.now());
      });
      this.em.getUnitOfWork().unsetIdentity(run);
      await this.ctx.runQueue.withdraw(run.id).catch(this.ctx.logError);
      // Open pages of the bench and of the run learn that it is gone.
      const benchId = run.bench.id;
      this.ctx.runEvents.publish({ name: 'deleted', benchId, runId: run.id, data: { id: run.id, benchId, name: run.name, deletedBy: me.displayName } });
    });
  }
}
