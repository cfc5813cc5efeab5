/**
 * What runners do to runs (the rules behind /api/runner/*): claim a run under a lease of 45 s (fairly when
 * no run id is given), renew leases, report progress, finish or give back. A runner may touch only the
 * runs it holds. Claiming a run that trained before resumes it from its latest checkpoint: metric points
 * after that checkpoint's step are removed so steps stay strictly increasing.
 */
import type { EntityManager } from '@mikro-orm/better-sqlite';
import { ErrorCode } from '../../../shared/api/errors';
import {
  RUNNER_HEARTBEAT_EVERY_SECONDS,
  RUNNER_LEASE_SECONDS,
  RUNNER_PROGRESS_EVERY_SECONDS,
  type RunnerControl,
  type RunnerJob,
  type runnerFinishSchema,
  type runnerHeartbeatSchema,
  type runnerProgressSchema,
} from '../../../shared/api/runner-jobs';
import type { z } from 'zod';
import type { AppContext } from '../../app-context';
import { conflict, HttpError, notFound } from '../../http-error';
import { Checkpoint } from '../runs/checkpoint.entity';
import { MetricRepository } from '../runs/metric.repository';
import { Run } from '../runs/run.entity';
import { withRunLock } from '../runs/run-lock';
import { RunService } from '../runs/run.service';
import { EvaluationJobService } from '../evaluation-jobs/evaluation-job.service';
import type { Runner } from './runner.entity';
import { leaseUntil } from './runner.repository';
import { UUID } from '../../ids';

/** 409 RUN_HELD with the seconds until the other runner's lease ends. */
export class RunHeldError extends HttpError {
  constructor(
    message: string,
    readonly retryAfterSeconds: number,
  ) {
    super(409, ErrorCode.RunHeld, message);
  }
}

const notQueued = (run: Run | null) =>
  conflict(ErrorCode.RunNotQueued, run ? `The run "${run.name}" no longer waits for a runner (it is ${run.status}${run.placement === 'tab' ? ', in a browser tab' : ''}).` : 'This run no longer exists.');

export class RunnerJobService {
  private readonly runs: RunService;

  constructor(
    private readonly ctx: AppContext,
    private readonly em: EntityManager = ctx.orm.em,
  ) {
    this.runs = new RunService(ctx, em);
  }

  /**
   * The run if this runner holds it; 404 for an unknown id, 409 RUN_NOT_HELD otherwise. Only its runner is
   * loaded unless asked (the bench and corpus stay references: a progress call need not read them).
   */
  async held(runner: Runner, runId: string, withCorpus = false): Promise<Run> {
    const run = UUID.test(runId) ? await this.em.findOne(Run, { id: runId }, { populate: withCorpus ? ['corpus', 'runner'] : ['runner'] }) : null;
    if (!run) throw notFound('This run');
    this.requireHeld(runner, run);
    return run;
  }

  /**
   * Runs `work` under the run's lock with the run read inside it (so no second read is needed to see changes
   * made while the lock was waited for); 404 / 409 RUN_NOT_HELD as `held`.
   */
  private async whileHeld<T>(runner: Runner, runId: string, work: (run: Run) => Promise<T>): Promise<T> {
    if (!UUID.test(runId)) throw notFound('This run');
    return withRunLock(runId, async () => {
      const run = await this.em.findOne(Run, { id: runId }, { populate: ['runner'], refresh: true });
      if (!run) throw notFound('This run');
      this.requireHeld(runner, run);
      return work(run);
    });
  }

  private requireHeld(runner: Runner, run: Run): void {
    if (run.placement !== 'runners' || run.runner?.id !== runner.id) {
      throw conflict(ErrorCode.RunNotHeld, `This runner does not hold the run "${run.name}"${run.runner ? ' (another runner does)' : ''}; claim a run before you work on it.`);
    }
  }

  /** Whether a run waits for a runner now (queued, or training under a lease that ran out). */
  private claimable(run: Run, now: Date): boolean {
    if (run.placement !== 'runners' || run.archived) return false;
    if (run.status !== 'queued' && run.status !== 'training') return false;
    return !run.runner || !run.leaseExpiresAt || run.leaseExpiresAt <= now;
  }

  /** `POST /claim`: the job, or null when nothing waits. */
  async claim(runner: Runner, runId: string | undefined): Promise<RunnerJob | null> {
    const now = this.ctx.clock.now();
    if (runId !== undefined) {
      const run = await this.em.findOne(Run, { id: runId }, { populate: ['bench', 'runner'] });
      if (!run) throw notQueued(null);
      return this.runs.locked(run, async () => {
        if (run.runner?.id === runner.id && run.status === 'training') return this.take(runner, run);
        if (run.placement === 'runners' && run.runner && run.leaseExpiresAt && run.leaseExpiresAt > now && run.status === 'training') {
          const seconds = Math.max(1, Math.ceil((run.leaseExpiresAt.getTime() - now.getTime()) / 1000));
          throw new RunHeldError(`The runner "${run.runner.name}" holds "${run.name}"; try again in ${seconds} s.`, seconds);
        }
        if (!this.claimable(run, now)) throw notQueued(run);
        return this.take(runner, run);
      });
    }
    for (const candidate of await this.fairOrder(now)) {
      const job = await this.runs.locked(candidate, async () => (this.claimable(candidate, this.ctx.clock.now()) ? this.take(runner, candidate) : null));
      if (job) return job;
    }
    return null;
  }

  /**
   * Runs waiting for a runner in fair order: the bench with the fewest runs now held by runners first, then
   * the oldest run.
   */
  async fairOrder(now: Date): Promise<Run[]> {
    const waiting = await this.em.find(
      Run,
      {
        placement: 'runners',
        archived: false,
        status: { $in: ['queued', 'training'] },
        $or: [{ runner: null }, { leaseExpiresAt: null }, { leaseExpiresAt: { $lte: now } }],
      },
      { populate: ['bench', 'runner'], orderBy: { createdAt: 'asc', id: 'asc' }, limit: 1000 },
    );
    const held = await this.em.find(Run, { placement: 'runners', runner: { $ne: null }, leaseExpiresAt: { $gt: now } }, { populate: ['bench'] });
    const load = new Map<string, number>();
    for (const r of held) load.set(r.bench.id, (load.get(r.bench.id) ?? 0) + 1);
    // Array.prototype.sort is stable: within a bench load, the oldest run stays first.
    return waiting.sort((a, b) => (load.get(a.bench.id) ?? 0) - (load.get(b.bench.id) ?? 0));
  }

  /** Gives the run to the runner (call under the run's lock). */
  private async take(runner: Runner, run: Run): Promise<RunnerJob> {
    const now = this.ctx.clock.now();
    const latest = await this.em.findOne(Checkpoint, { run }, { orderBy: { createdAt: 'desc', step: 'desc', id: 'asc' } });
    // Resume from the latest checkpoint: later metric points would repeat steps (none at all without a checkpoint).
    await new MetricRepository(this.em).truncateAfter(run, latest ? latest.step : -1);
    const before = run.status;
    if (run.status !== 'training') this.runs.applyStatus(run, { status: 'training', actor: null });
    run.stepsDone = latest?.step ?? 0;
    run.runner = runner;
    run.leaseExpiresAt = leaseUntil(now);
    run.requestedControl = null;
    const steps = (run.settings.training as { steps?: number } | undefined)?.steps ?? 0;
    run.live = { step: run.stepsDone, steps, stepsPerSecond: null, etaSeconds: null, bitsPerChar: null, isBound: null, runnerName: runner.name, updatedAt: now.toISOString() };
    run.updatedAt = now;
    await this.em.flush();
    await this.runs.afterChange(run, before);
    return {
      runId: run.id,
      benchId: run.bench.id,
      runName: run.name,
      family: run.family,
      settings: run.settings,
      alphabet: run.alphabet,
      stepsDone: run.stepsDone,
      checkpoint: latest ? { id: latest.id, step: latest.step } : null,
      leaseSeconds: RUNNER_LEASE_SECONDS,
      progressEverySeconds: RUNNER_PROGRESS_EVERY_SECONDS,
    };
  }

  /** `POST /heartbeat`: the runner's figures, renewed leases, and the controls it must act on. */
  async heartbeat(runner: Runner, body: z.output<typeof runnerHeartbeatSchema>): Promise<RunnerControl[]> {
    const now = this.ctx.clock.now();
    if (body.name && runner.kind === 'remote') runner.name = body.name;
    runner.threads = body.threads;
    runner.lastHeartbeatAt = now;
    runner.reportedJobs = body.jobs;
    const rates = body.jobs.map((j) => j.stepsPerSecond).filter((v): v is number => v !== null);
    runner.stepsPerSecond = rates.length > 0 ? rates.reduce((a, b) => a + b, 0) : null;
    await this.em.flush();
    const ids = body.jobs.map((j) => j.runId);
    if (ids.length > 0) await this.em.nativeUpdate(Run, { id: { $in: ids }, runner }, { leaseExpiresAt: leaseUntil(now) });
    const asked = await this.em.find(Run, { runner, requestedControl: { $ne: null } });
    return asked.map((r) => ({ runId: r.id, action: r.requestedControl! }));
  }

  /** `POST /jobs/:runId/progress`: live figures, steps done, `training` on the first call; answers the control. */
  async progress(runner: Runner, runId: string, body: z.output<typeof runnerProgressSchema>): Promise<'continue' | 'pause' | 'stop'> {
    return this.whileHeld(runner, runId, async (run) => {
      const now = this.ctx.clock.now();
      const before = run.status;
      if (run.status !== 'training') this.runs.applyStatus(run, { status: 'training', actor: null });
      run.stepsDone = body.step;
      if (body.summary) {
        run.summary = { ...run.summary, ...body.summary };
        run.bestBoundBitsPerChar = run.summary.bestValidationBitsPerChar ?? null;
      }
      const eta = body.stepsPerSecond && body.stepsPerSecond > 0 ? Math.max(0, (body.steps - body.step) / body.stepsPerSecond) : null;
      run.live = {
        step: body.step, steps: body.steps, stepsPerSecond: body.stepsPerSecond, etaSeconds: eta, bitsPerChar: body.bitsPerChar,
        isBound: body.isBound, runnerName: runner.name, updatedAt: now.toISOString(),
      };
      run.leaseExpiresAt = leaseUntil(now);
      run.updatedAt = now;
      // The runner's own row only when its last sign of life is older than half a heartbeat interval (one write less per call).
      if (!runner.lastHeartbeatAt || now.getTime() - runner.lastHeartbeatAt.getTime() >= RUNNER_HEARTBEAT_EVERY_SECONDS * 1000 / 2) runner.lastHeartbeatAt = now;
      await this.em.flush();
      this.ctx.runEvents.publish({ name: 'progress', benchId: run.bench.id, runId: run.id, data: run.live });
      await this.runs.afterChange(run, before);
      return run.requestedControl ?? 'continue';
    });
  }

  /** `POST /jobs/:runId/finish`: the run's new status (through the machine); releases the lease. */
  async finish(runner: Runner, runId: string, body: z.output<typeof runnerFinishSchema>): Promise<void> {
    await this.whileHeld(runner, runId, async (run) => {
      const before = run.status;
      if (this.runs.isLate(run, body.status)) return;
      this.runs.applyStatus(run, { status: body.status, statusReason: body.statusReason, stepsDone: body.stepsDone, summary: body.summary, actor: null });
      if (body.status !== 'queued') runner.jobsDone += 1;
      await this.em.flush();
      await this.runs.afterChange(run, before);
    });
  }

  /** Gives every run a runner holds back to the queue (its token was revoked, or the server restarted its threads). */
  async releaseAll(runner: Runner): Promise<number> {
    const runs = await this.em.find(Run, { runner }, { populate: ['bench', 'runner'] });
    for (const run of runs) await this.giveBack(run, () => run.runner?.id === runner.id);
    await new EvaluationJobService(this.ctx, this.em).releaseAll(runner.id);
    return runs.length;
  }

  /**
   * Gives back every run left `training` under a lease that ran out (its runner stopped answering: killed,
   * off the network, asleep), with a reason that says so; returns how many. One indexed query when none did.
   */
  async releaseExpired(): Promise<number> {
    const now = this.ctx.clock.now();
    const runs = await this.em.find(Run, { placement: 'runners', status: 'training', runner: { $ne: null }, leaseExpiresAt: { $lte: now } }, { populate: ['runner'] });
    let released = 0;
    for (const run of runs) {
      // Decided again under the lock: a progress call may have renewed the lease meanwhile.
      const stillExpired = () => run.status === 'training' && !!run.runner && !!run.leaseExpiresAt && run.leaseExpiresAt <= this.ctx.clock.now();
      const reason = () =>
        `The runner "${run.runner?.name ?? 'runner'}" stopped answering (no word since its lease ran out at ${run.leaseExpiresAt!.toISOString().slice(11, 19)} UTC); ` +
        'waiting for a runner, which resumes from the latest checkpoint.';
      if (await this.giveBack(run, stillExpired, reason)) released++;
    }
    return released;
  }

  /**
   * Under the run's lock, if `stillHeld()`: a training or queued run goes back to `queued` (with `reason`), and
   * any run loses its holder and lease; the change is queued and published. Whether it was given back.
   */
  private async giveBack(run: Run, stillHeld: () => boolean, reason?: () => string): Promise<boolean> {
    return this.runs.locked(run, async () => {
      if (!stillHeld()) return false;
      const before = run.status;
      if (run.status === 'training' || run.status === 'queued') this.runs.applyStatus(run, { status: 'queued', statusReason: reason?.(), actor: null });
      run.runner = null;
      run.leaseExpiresAt = null;
      await this.em.flush();
      await this.runs.afterChange(run, before);
      return true;
    });
  }
}
