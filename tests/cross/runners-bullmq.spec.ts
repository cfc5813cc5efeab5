/**
 * Scale-out end to end with real parts: the server with QUEUE_URL on a private redis-server (free loopback port,
 * temp folder, no persistence), two runner processes (`runner/main.ts --queue ...`, one thread each) and a
 * 4-cell grid of tiny runs. The first runner seen training a run past its first checkpoint is killed with SIGKILL;
 * BullMQ's stalled-job check gives its job to the other runner, which claims the run once the lease expired and resumes from the latest
 * checkpoint. Every run must finish; per run the training curve's steps strictly increase, have no duplicates
 * and no gap over one checkpoint interval (points after the resumed checkpoint were removed and written again),
 * and the final checkpoint decodes at the last step.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeCheckpoint } from '../../shared/model/checkpoint';
import {
  createRunnerGrid, latestCheckpointBytes, openLab, runnerToken, runsOf, spawnRunner, startHarnessServer, startRedis, trainSteps, waitFor,
  type HarnessServer, type Lab, type RedisProcess, type RunnerProcess,
} from './support/runner-harness';

// Long enough that a run is seen mid-way (progress every second) on a fast machine: a tiny step takes a few ms.
const STEPS = 1000;
const CHECKPOINT_EVERY = 25;

let redis: RedisProcess;
let server: HarnessServer;
let lab: Lab;
const runners: RunnerProcess[] = [];

beforeAll(async () => {
  redis = await startRedis();
  server = await startHarnessServer({ QUEUE_URL: redis.url });
  lab = await openLab(server.url);
}, 60_000);

afterAll(async () => {
  for (const r of runners) if (r.child.exitCode === null && r.child.signalCode === null) r.child.kill('SIGKILL');
  await Promise.all(runners.map((r) => r.exited));
  await server?.stop();
  await redis?.stop();
}, 60_000);

describe('runners on BullMQ + Redis', () => {
  it('finishes a 4-cell grid although one of two runners is killed mid-run, with whole curves and loadable checkpoints', async () => {
    const tokens = [await runnerToken(server.url, lab, 'runner-a'), await runnerToken(server.url, lab, 'runner-b')];
    const grid = await createRunnerGrid(server.url, lab, 'Seeds', [1, 2, 3, 4], STEPS, CHECKPOINT_EVERY);
    expect(grid.cells).toHaveLength(4);
    for (const [i, token] of tokens.entries()) {
      runners.push(spawnRunner(['--server', server.url, '--token', token, '--queue', redis.url, '--threads', '1', '--name', `runner-${'ab'[i]}`]));
    }

    // Kill whichever runner first holds a run that is past its first checkpoint but not near its end.
    const victim = await waitFor('a runner to train a run past its first checkpoint', async () => {
      const runs = await runsOf(server.url, lab);
      return runs.find((r) => r.runner && r.status === 'training' && r.stepsDone >= CHECKPOINT_EVERY + 3 && r.stepsDone < STEPS - 10) ?? null;
    }, 90_000, 100).catch(async (e: Error) => {
      const runs = (await runsOf(server.url, lab)).map((r) => `${r.name}: ${r.status} ${r.stepsDone} ${r.runner?.name ?? '-'}`).join('\n');
      throw new Error(`${e.message}\nruns:\n${runs}\nrunner A said:\n${runners[0]!.output().slice(-2000)}\nrunner B said:\n${runners[1]!.output().slice(-2000)}`);
    });
    const killed = victim.runner!.name === 'runner-a' ? 0 : 1;
    const survivor = runners[1 - killed]!;
    runners[killed]!.child.kill('SIGKILL');
    await runners[killed]!.exited;

    const finished = await waitFor('all four runs to finish', async () => {
      const runs = await runsOf(server.url, lab);
      const failed = runs.find((r) => r.status === 'failed');
      if (failed) throw new Error(`Run ${failed.name} failed: ${failed.statusReason}`);
      return runs.length === 4 && runs.every((r) => r.status === 'finished') ? runs : null;
    }, 130_000, 500).catch((e: Error) => { throw new Error(`${e.message}\nthe other runner said:\n${survivor.output().slice(-3000)}`); });

    expect(finished.map((r) => r.stepsDone)).toEqual([STEPS, STEPS, STEPS, STEPS]);
    // The killed runner's run went on elsewhere: the other runner claimed it and finished it.
    expect(finished.find((r) => r.id === victim.id)!.status).toBe('finished');
    expect(survivor.output()).toContain(`${victim.name}: claimed`);

    for (const run of finished) {
      const steps = await trainSteps(server.url, lab, run.id);
      expect(steps[0], `first step of ${run.name}`).toBeLessThanOrEqual(CHECKPOINT_EVERY);
      expect(steps.at(-1), `last step of ${run.name}`).toBe(STEPS);
      for (let i = 1; i < steps.length; i++) {
        const gap = steps[i]! - steps[i - 1]!;
        expect(gap, `${run.name}: steps ${steps[i - 1]} → ${steps[i]}`).toBeGreaterThan(0);
        expect(gap, `${run.name}: steps ${steps[i - 1]} → ${steps[i]}`).toBeLessThanOrEqual(CHECKPOINT_EVERY);
      }
      const { dto, bytes } = await latestCheckpointBytes(server.url, lab, run.id);
      const ck = decodeCheckpoint(bytes);
      expect(ck.family).toBe('ssm');
      expect(ck.step).toBe(STEPS);
      expect(dto.step).toBe(STEPS);
    }
  }, 170_000);
});
