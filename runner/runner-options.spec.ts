import { describe, expect, it } from 'vitest';
import { parseRunnerArgs } from './runner-options';
import { ProgressDisplay } from './progress-display';

const token = `nwr_${'A'.repeat(43)}`;

describe('npm run runner options', () => {
  it('reads server, token, queue, threads and name, and takes the token from the environment too', () => {
    const o = parseRunnerArgs(['--server', 'http://10.0.0.5:4300/', '--token', token, '--queue', 'redis://10.0.0.5:6379', '--threads', '3', '--name', 'lab-3']);
    expect(o).toEqual({ serverUrl: 'http://10.0.0.5:4300', token, threads: 3, name: 'lab-3', queueUrl: 'redis://10.0.0.5:6379' });
    expect(parseRunnerArgs(['--server', 'http://h:1'], { NOISEWRIGHT_RUNNER_TOKEN: token })?.token).toBe(token);
    expect(parseRunnerArgs(['--help'])).toBeNull();
  });

  it('refuses bad options with a sentence that names the option', () => {
    expect(() => parseRunnerArgs(['--token', token])).toThrow(/--server/);
    expect(() => parseRunnerArgs(['--server', 'ftp://h', '--token', token])).toThrow(/--server must start with http/);
    expect(() => parseRunnerArgs(['--server', 'http://h:1'])).toThrow(/runner token/);
    expect(() => parseRunnerArgs(['--server', 'http://h:1', '--token', 'user-token'])).toThrow(/--token must be a runner token/);
    expect(() => parseRunnerArgs(['--server', 'http://h:1', '--token', token, '--threads', '0'])).toThrow(/--threads must be a whole number from 1/);
    expect(() => parseRunnerArgs(['--server', 'http://h:1', '--token', token, '--queue', 'localhost:6379'])).toThrow(/--queue must look like redis/);
  });

  it('prints a plain line per job (at most one per interval) with the figure labelled bound or exact', () => {
    const lines: string[] = [];
    const display = new ProgressDisplay({ write: (t: string) => lines.push(t), isTTY: false }, 60_000);
    const p = { runId: 'r1', runName: 'seed 1', step: 10, steps: 100, stepsPerSecond: 5, bitsPerChar: 3.25, isBound: true };
    display.update(p);
    display.update({ ...p, step: 11 }); // within the interval: no second line
    display.update({ ...p, runId: 'r2', runName: 'gru', isBound: null });
    display.done('seed 1', { runId: 'r1', status: 'finished', step: 100, reason: null });
    expect(lines).toEqual([
      'seed 1: step 10/100  5.0 steps/s  3.250 bits/char (end-of-word counted), bound\n',
      'gru: step 10/100  5.0 steps/s  3.250 bits/char (end-of-word counted), exact\n',
      'seed 1: finished at step 100\n',
    ]);
  });
});
