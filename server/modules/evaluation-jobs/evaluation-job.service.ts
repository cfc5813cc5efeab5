/**
 * What runners do to evaluation requests, under the training runners' rules (runner-job.service.ts): a claim
 * holds a request under a lease of RUNNER_LEASE_SECONDS, every progress call renews it, a runner may touch only
 * the request it holds (409 RUN_NOT_HELD otherwise), and a request whose lease ran out waits for the next runner.
 * The figures a runner posts go through `storeEvaluation`, the checks of a tab's figures; a 422 there leaves the
 * request and the stored evaluations as they were. Claims are one conditional UPDATE, so two runners can never
 * hold the same request.
 */
import type { EntityManager, FilterQuery } from '@mikro-orm/core';
import { ErrorCode } from '../../../shared/api/errors';
import type { EvaluationRequestDto, RunnerEvaluationJob, runnerEvaluationEndSchema, runnerEvaluationProgressSchema } from '../../../shared/api/evaluation-jobs';
import { evaluationSettingsKey, type EvaluationResults, type StoredEvaluationSettings } from '../../../shared/api/evaluations';
import { RUNNER_LEASE_SECONDS, RUNNER_PROGRESS_EVERY_SECONDS } from '../../../shared/api/runner-jobs';
import type { z } from 'zod';
import type { AppContext } from '../../app-context';
import { conflict, notFound } from '../../http-error';
import type { Bench } from '../benches/bench.entity';
import { storeEvaluation } from '../evaluations/evaluation-store';
import type { Checkpoint } from '../runs/checkpoint.entity';
import type { Run } from '../runs/run.entity';
import type { Runner } from '../runners/runner.entity';
import { RunHeldError } from '../runners/runner-job.service';
import { leaseUntil } from '../runners/runner.repository';
import type { User } from '../users/user.entity';
import { EvaluationRequest } from './evaluation-request.entity';
import { UUID } from '../../ids';

const populate = ['run', 'checkpoint', 'runner', 'createdBy'] as const;

export function toEvaluationRequestDto(r: EvaluationRequest): EvaluationRequestDto {
  return {
    id: r.id, benchId: r.bench.id, runId: r.run.id, checkpoint: { id: r.checkpoint?.id ?? null, step: r.checkpointStep },
    settings: r.settings, status: r.status, statusReason: r.statusReason, runnerName: r.runner?.name ?? null, stage: r.stage,
    evaluationId: r.evaluation?.id ?? null,
    createdBy: r.createdBy ? { id: r.createdBy.id, displayName: r.createdBy.displayName } : null,
    createdAt: r.createdAt.toISOString(), updatedAt: r.updatedAt.toISOString(),
  };
}

/** The waiting or held condition a claim needs: waiting, or running under a lease that ran out. */
const claimableAt = (now: Date): FilterQuery<EvaluationRequest> => ({ $or: [{ status: 'waiting' }, { status: 'running', leaseExpiresAt: { $lte: now } }] });

export class EvaluationJobService {
  constructor(
    private readonly ctx: AppContext,
    private readonly em: EntityManager = ctx.orm.em,
  ) {}

  /** A waiting or running request of this checkpoint with the same settings, if any (a second ask returns it). */
  pending(checkpoint: Checkpoint, settings: StoredEvaluationSettings): Promise<EvaluationRequest | null> {
    return this.em.findOne(EvaluationRequest, { checkpoint, settingsKey: evaluationSettingsKey(settings), status: { $in: ['waiting', 'running'] } },
      { populate: [...populate] });
  }

  /** A new waiting request (flushed); the queue gets its job. */
  async create(bench: Bench, run: Run, checkpoint: Checkpoint, by: User, settings: StoredEvaluationSettings): Promise<EvaluationRequest> {
    const now = this.ctx.clock.now();
    const request = this.em.create(EvaluationRequest, {
      bench, run, checkpoint, checkpointStep: checkpoint.step, createdBy: by, settings, settingsKey: evaluationSettingsKey(settings), createdAt: now, updatedAt: now,
    });
    await this.em.flush();
    await this.offerToRunners(request);
    return request;
  }

  forCheckpoint(checkpoint: Checkpoint): Promise<EvaluationRequest[]> {
    return this.em.find(EvaluationRequest, { checkpoint }, { populate: [...populate], orderBy: { createdAt: 'desc', id: 'asc' }, limit: 50 });
  }

  find(bench: Bench, id: string): Promise<EvaluationRequest | null> {
    return UUID.test(id) ? this.em.findOne(EvaluationRequest, { id, bench }, { populate: [...populate] }) : Promise.resolve(null);
  }

  /** `POST /evaluations/claim`: the job, or null when nothing waits (or the named request no longer does). */
  async claim(runner: Runner, requestId: string | undefined): Promise<RunnerEvaluationJob | null> {
    const now = this.ctx.clock.now();
    const candidates = requestId !== undefined
      ? [requestId]
      : (await this.em.find(EvaluationRequest, claimableAt(now), { fields: ['id'], orderBy: { createdAt: 'asc', id: 'asc' }, limit: 20 })).map((r) => r.id);
    for (const id of candidates) {
      const taken = await this.em.nativeUpdate(EvaluationRequest, { $and: [{ id }, claimableAt(now)] },
        { status: 'running', runner: runner.id, leaseExpiresAt: leaseUntil(now), stage: null, statusReason: null, updatedAt: now });
      if (taken === 0) {
        if (requestId !== undefined) await this.refuseHeld(requestId, now);
        continue;
      }
      const request = await this.em.findOneOrFail(EvaluationRequest, { id }, { populate: ['run', 'checkpoint', 'bench'], refresh: true });
      if (!request.checkpoint) {
        await this.end(request, 'failed', `The checkpoint at step ${request.checkpointStep} was removed before a runner could evaluate it; evaluate another checkpoint.`);
        continue;
      }
      return {
        requestId: request.id, benchId: request.bench.id, runId: request.run.id, runName: request.run.name, family: request.run.family,
        checkpoint: { id: request.checkpoint.id, step: request.checkpoint.step }, settings: request.settings,
        split: request.run.settings.split ?? null, leaseSeconds: RUNNER_LEASE_SECONDS, progressEverySeconds: RUNNER_PROGRESS_EVERY_SECONDS,
      };
    }
    return null;
  }

  /** 409 RUN_HELD (retry after the lease) when another runner holds the named request under a fresh lease. */
  private async refuseHeld(id: string, now: Date): Promise<void> {
    const other = UUID.test(id) ? await this.em.findOne(EvaluationRequest, { id }, { populate: ['runner', 'run'], refresh: true }) : null;
    if (other?.status !== 'running' || !other.leaseExpiresAt || other.leaseExpiresAt <= now) return;
    const seconds = Math.max(1, Math.ceil((other.leaseExpiresAt.getTime() - now.getTime()) / 1000));
    throw new RunHeldError(`The runner "${other.runner?.name ?? 'runner'}" holds the evaluation of "${other.run.name}"; try again in ${seconds} s.`, seconds);
  }

  /** The request if this runner holds it (running, its runner); 404 for an unknown id, 409 RUN_NOT_HELD otherwise. */
  async held(runner: Runner, id: string): Promise<EvaluationRequest> {
    const request = UUID.test(id)
      ? await this.em.findOne(EvaluationRequest, { id }, { populate: ['run', 'run.corpus', 'checkpoint', 'runner', 'bench', 'createdBy'], refresh: true })
      : null;
    if (!request) throw notFound('This evaluation request');
    if (request.status !== 'running' || request.runner?.id !== runner.id) {
      throw conflict(ErrorCode.RunNotHeld, `This runner does not hold the evaluation of "${request.run.name}" at step ${request.checkpointStep}` +
        `${request.runner ? ' (another runner does)' : ` (it is ${request.status})`}; claim it before you work on it.`);
    }
    return request;
  }

  /** `POST /evaluations/:id/progress`: the stage for the page; renews the lease. */
  async progress(runner: Runner, id: string, body: z.output<typeof runnerEvaluationProgressSchema>): Promise<void> {
    const request = await this.held(runner, id);
    const now = this.ctx.clock.now();
    request.stage = { done: Math.min(body.done, body.total), total: body.total, next: body.next };
    request.leaseExpiresAt = leaseUntil(now);
    request.updatedAt = now;
    await this.em.flush();
  }

  /** `POST /evaluations/:id/result`: stores the figures as a tab's would be (422 and nothing written when they fail the checks). */
  async result(runner: Runner, id: string, results: EvaluationResults): Promise<string> {
    const request = await this.held(runner, id);
    if (!request.checkpoint) throw notFound(`The checkpoint at step ${request.checkpointStep}`);
    const now = this.ctx.clock.now();
    const { evaluation } = await storeEvaluation(this.em, {
      bench: request.bench, run: request.run, checkpoint: request.checkpoint, by: request.createdBy, settings: request.settings, results, at: now,
      note: `(computed by the runner "${runner.name}")`,
    });
    request.evaluation = evaluation;
    request.status = 'finished';
    request.stage = null;
    request.runner = null;
    request.leaseExpiresAt = null;
    request.updatedAt = now;
    runner.jobsDone += 1;
    await this.em.flush();
    return evaluation.id;
  }

  /** `POST /evaluations/:id/end`: failed with the runner's reason, or given back to wait for another runner. */
  async finishHeld(runner: Runner, id: string, body: z.output<typeof runnerEvaluationEndSchema>): Promise<void> {
    const request = await this.held(runner, id);
    await this.end(request, body.status, body.reason ?? null);
  }

  private async end(request: EvaluationRequest, status: 'failed' | 'waiting', reason: string | null): Promise<void> {
    request.status = status;
    request.statusReason = reason;
    request.stage = null;
    request.runner = null;
    request.leaseExpiresAt = null;
    request.updatedAt = this.ctx.clock.now();
    await this.em.flush();
    if (status === 'waiting') {
      await this.offerToRunners(request);
    }
  }

  /**
   * Withdraws a request nobody computes (waiting, or failed and kept for its reason): the row goes, and so does its
   * queue job. A running request is refused (409: its runner is computing it), as is a finished one (its figures
   * are stored: delete the evaluation instead).
   */
  async withdraw(request: EvaluationRequest): Promise<void> {
    if (request.status === 'running') {
      throw conflict(ErrorCode.Conflict, `The runner "${request.runner?.name ?? 'runner'}" is computing this evaluation already; its figures are stored when it is done, and you can delete them then.`);
    }
    if (request.status === 'finished') {
      throw conflict(ErrorCode.Conflict, 'This evaluation is done and its figures are stored; delete the stored evaluation instead.');
    }
    // Only if it still waits or failed: a runner may have claimed it since it was read.
    const gone = await this.em.nativeDelete(EvaluationRequest, { id: request.id, status: { $in: ['waiting', 'failed'] } });
    if (gone === 0) throw conflict(ErrorCode.Conflict, 'A runner has just started this evaluation; its figures are stored when it is done.');
    this.em.getUnitOfWork().unsetIdentity(request);
    await this.ctx.runQueue.withdraw(request.id).catch(this.ctx.logError);
  }

  /** A request that (again) waits for a runner: its queue job (BullMQ), and runner claims that wait for work wake. */
  private async offerToRunners(request: EvaluationRequest): Promise<void> {
    await this.ctx.runQueue.enqueueEvaluations([{ requestId: request.id, runId: request.run.id, benchId: request.bench.id }]);
    this.ctx.runnerWakeup.notify();
  }

  /** Requests whose runner stopped answering (lease ran out) wait again, with a reason that says so; returns how many. */
  async releaseExpired(): Promise<number> {
    const now = this.ctx.clock.now();
    const released = await this.em.nativeUpdate(EvaluationRequest, { status: 'running', leaseExpiresAt: { $lte: now } }, {
      status: 'waiting', runner: null, leaseExpiresAt: null, stage: null, updatedAt: now,
      statusReason: 'Its runner stopped answering (the lease ran out); waiting for another runner, which starts the evaluation again.',
    });
    if (released > 0) this.ctx.runnerWakeup.notify();
    return released;
  }

  /** Every request a runner holds waits again (its token was revoked, or the server restarted its threads). */
  async releaseAll(runnerId: string): Promise<number> {
    const released = await this.em.nativeUpdate(EvaluationRequest, { status: 'running', runner: runnerId }, {
      status: 'waiting', runner: null, leaseExpiresAt: null, stage: null, updatedAt: this.ctx.clock.now(),
    });
    if (released > 0) this.ctx.runnerWakeup.notify();
    return released;
  }
}
