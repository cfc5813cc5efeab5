/**
 * The one training loop: steps an engine (shared/training/run-engines.ts) up to `settings.steps`, measures the
 * validation figures every `evalEvery` steps and at the end, reports throttled progress, saves checkpoints every
 * `checkpointEvery` steps and when it pauses, stops or ends, and stops on a non-finite loss with the weights of
 * the last good step (which it saves). The browser worker, `npm run train` and the runner program all call it;
 * what differs between them comes in through the hooks (where progress, points and checkpoints go, the clock,
 * how to yield, and the "should I pause or stop" poll).
 */
import { TrainerErrorCode, toTrainerError } from '../model/trainer-errors';
import type { RunEngine, StepFigures } from './run-engines';
import type { TrainerSettings, TrainingOutcome, TrainingProgress } from './training-types';

/** What the poll asks the loop to do before the next step. */
export type LoopControl = 'continue' | 'pause' | 'stop';

/** Why a checkpoint is saved: every N steps, before pausing, on a stop, at the end, or after a non-finite loss. */
export type CheckpointReason = 'auto' | 'pause' | 'stop' | 'end' | 'failed';

/** How the loop ended: the trainer's outcomes plus `paused` (only without `waitWhilePaused`). */
export type LoopOutcome = TrainingOutcome | { kind: 'paused'; step: number };

export interface TrainingLoopHooks {
  /** Milliseconds from any origin (default: `performance.now`). */
  now?: () => number;
  /** Least time between two progress reports; 0 reports after every step. */
  progressEveryMs: number;
  /** Give the event loop a turn this often, so control messages and network answers are served (default 25). */
  yieldEveryMs?: number;
  yieldToEvents?: () => Promise<void>;
  /** Called after every step with that step's figures (before any progress report of the step). */
  onStep?: (step: number, figures: StepFigures) => void;
  /** Throttled progress; awaited only for the last report (so it lands before the loop resolves). */
  onProgress?: (progress: TrainingProgress) => void | Promise<void>;
  /** Asked before every step. */
  poll?: () => LoopControl;
  /**
   * With it, `pause` waits here until resumed (the paused time is left out of the speed). Without it, `pause`
   * saves a checkpoint and ends the loop with the outcome `paused`.
   */
  waitWhilePaused?: () => Promise<void>;
  /** Save a checkpoint every this many steps (0 or absent: only on pause, stop, end and failure). */
  checkpointEvery?: number;
  /** Where checkpoints go; awaited, so a save finishes before training goes on. Without it nothing is saved. */
  saveCheckpoint?: (reason: CheckpointReason, engine: RunEngine) => Promise<void>;
}

const defaultYield = () => new Promise<void>((resolve) => setTimeout(resolve, 0));

/** The first step at which an automatic checkpoint is due after `step` (Infinity when off). */
export function nextCheckpointStep(step: number, every: number | undefined): number {
  return every && every > 0 ? (Math.floor(step / every) + 1) * every : Number.POSITIVE_INFINITY;
}

/** Trains `engine` according to `settings` with the given hooks; never throws for a failed step (see the outcome). */
export async function runTrainingLoop(engine: RunEngine, settings: TrainerSettings, hooks: TrainingLoopHooks): Promise<LoopOutcome> {
  const now = hooks.now ?? (() => performance.now());
  const save = async (reason: CheckpointReason) => { if (hooks.saveCheckpoint) await hooks.saveCheckpoint(reason, engine); };
  if (engine.closedForm || engine.stepCount >= settings.steps) {
    // A closed-form model has no steps; a run resumed from the checkpoint of its last step (the page closed between
    // that save and the end) has none left. Both still report their validation figures, which the resumed run may
    // never have sent.
    const step = engine.closedForm ? 0 : engine.stepCount;
    let evaluation;
    try {
      evaluation = engine.evaluate();
    } catch (e) {
      return { kind: 'failed', step, error: toTrainerError(e) };
    }
    const totalSteps = engine.closedForm ? 0 : settings.steps;
    await hooks.onProgress?.({ step, totalSteps, wordsPerSecond: 0, etaSeconds: 0, trainBitsPerChar: null, isBound: true, evaluation });
    await save('end');
    return { kind: 'completed', step };
  }
  const yieldEvery = hooks.yieldEveryMs ?? 25;
  const yieldToEvents = hooks.yieldToEvents ?? defaultYield;
  let nextSave = nextCheckpointStep(engine.stepCount, hooks.checkpointEvery);
  let lastYield = now();
  let lastReport = lastYield;
  let windowStart = lastYield;
  let windowSteps = 0;
  let windowPausedMs = 0;
  let sumBits = 0;
  let nBits = 0;
  let isBound = true;
  let wordsPerSecond = 0;
  while (engine.stepCount < settings.steps) {
    const control = hooks.poll?.() ?? 'continue';
    if (control === 'pause') {
      if (!hooks.waitWhilePaused) {
        await save('pause');
        return { kind: 'paused', step: engine.stepCount };
      }
      const pausedAt = now();
      await hooks.waitWhilePaused();
      windowPausedMs += now() - pausedAt;
      lastYield = now();
      continue; // ask again: a stop may have come in meanwhile
    }
    if (control === 'stop') {
      await save('stop');
      return { kind: 'stopped', step: engine.stepCount };
    }
    let figures: StepFigures;
    try {
      figures = engine.step();
    } catch (e) {
      const error = toTrainerError(e);
      // The trainer rolled the weights back to the last good step: keep them as the run's last checkpoint.
      if (error.code === TrainerErrorCode.NonFiniteLoss) await save('failed');
      return { kind: 'failed', step: engine.stepCount, error };
    }
    const step = engine.stepCount;
    hooks.onStep?.(step, figures);
    windowSteps++;
    sumBits += figures.bitsPerChar;
    nBits++;
    isBound = figures.isBound;
    const evalNow = (settings.evalEvery > 0 && step % settings.evalEvery === 0) || step === settings.steps;
    const t = now();
    if (evalNow || t - lastReport >= hooks.progressEveryMs) {
      const elapsed = (t - windowStart - windowPausedMs) / 1000;
      if (elapsed > 0) wordsPerSecond = (windowSteps * settings.batchSize) / elapsed;
      const progress: TrainingProgress = {
        step, totalSteps: settings.steps, wordsPerSecond,
        etaSeconds: wordsPerSecond > 0 ? ((settings.steps - step) * settings.batchSize) / wordsPerSecond : null,
        trainBitsPerChar: sumBits / nBits, isBound,
      };
      if (evalNow) {
        try {
          progress.evaluation = engine.evaluate();
        } catch (e) {
          return { kind: 'failed', step, error: toTrainerError(e) };
        }
      }
      if (step === settings.steps) await hooks.onProgress?.(progress);
      else void hooks.onProgress?.(progress);
      lastReport = now();
      windowStart = lastReport;
      windowSteps = 0;
      windowPausedMs = 0;
      sumBits = 0;
      nBits = 0;
    }
    if (step >= nextSave && step < settings.steps) {
      nextSave = nextCheckpointStep(step, hooks.checkpointEvery);
      await save('auto');
    }
    if (now() - lastYield >= yieldEvery) {
      await yieldToEvents();
      lastYield = now();
    }
  }
  await save('end');
  return { kind: 'completed', step: engine.stepCount };
}
