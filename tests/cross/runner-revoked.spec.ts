/**
 * A runner whose token an admin revokes while it trains: the runner program (`runner/main.ts`, a real child
 * process on the embedded back-end) says that the server refused its token and ends with exit status 3 instead
 * of asking again forever; the run it held goes back to the queue, held by nobody.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CreatedRunner } from '../../shared/api/runners';
import type { RunDto } from '../../shared/api/runs';
import {
  api, json, openLab, spawnRunner, startHarnessServer, tinySettings, waitFor, type HarnessServer, type Lab, type RunnerProcess,
} from './support/runner-harness';

let server: HarnessServer;
let lab: Lab;
let runner: RunnerProcess | null = null;

beforeAll(async () => {
  server = await startHarnessServer();
  lab = await openLab(server.url);
}, 60_000);

afterAll(async () => {
  if (runner && runner.child.exitCode === null && runner.child.signalCode === null) runner.child.kill('SIGKILL');
  await runner?.exited;
  await server?.stop();
}, 60_000);

describe('a revoked runner token', () => {
  it('ends the runner program with a clear message and exit status 3, and puts its run back in the queue', async () => {
    const created = await api<CreatedRunner>(server.url, '/runners', lab.token, json({ name: 'soon revoked' }));
    const run = await api<RunDto>(server.url, `/benches/${lab.benchId}/runs`, lab.token,
      json({ family: 'ssm', name: 'held when revoked', corpusId: lab.corpusId, settings: tinySettings(100_000, 50), placement: 'runners' }));
    runner = spawnRunner(['--server', server.url, '--token', created.token, '--threads', '1', '--name', 'soon revoked']);
    const getRun = () => api<RunDto>(server.url, `/benches/${lab.benchId}/runs/${run.id}`, lab.token);
    await waitFor('the runner to train the run', async () => {
      const r = await getRun();
      return r.status === 'training' && r.runner?.name === 'soon revoked' && r.stepsDone > 0;
    }, 120_000, 200);

    await api(server.url, `/runners/${created.runner.id}`, lab.token, { method: 'DELETE' });
    const code = await Promise.race([runner.exited, new Promise<'still running'>((r) => setTimeout(() => r('still running'), 60_000))]);
    expect(code, runner.output()).toBe(3);
    expect(runner.output()).toContain('the server refused the token');
    expect(runner.output()).toMatch(/revoked/i);

    const after = await getRun();
    expect(after.status).toBe('queued');
    expect(after.runner).toBeNull();
  }, 200_000);
});
