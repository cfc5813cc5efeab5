/**
 * A runner worker thread: sets up TF.js (WASM, as `npm run train`) once, then trains the jobs the main thread
 * hands it, one at a time. Messages in: `{ type: 'job', job, serverUrl, token }`, `{ type: 'command', command }`;
 * out: `{ type: 'ready', backend }`, `{ type: 'progress', progress }`, `{ type: 'done', result }`.
 */
import { parentPort } from 'node:worker_threads';
import type { RunnerEvaluationJob } from '../shared/api/evaluation-jobs';
import type { RunnerJob } from '../shared/api/runner-jobs';
import { evaluateJob } from './evaluate-job';
import { initNodeBackend } from '../shared/node/tf-node';
import { RunnerApi } from './runner-api';
import { trainJob, type JobCommand, type JobResult } from './train-job';

export type ToThread =
  | { type: 'job'; job: RunnerJob; serverUrl: string; token: string; command: JobCommand | null }
  | { type: 'command'; command: JobCommand }
  | { type: 'evaluate'; job: RunnerEvaluationJob; serverUrl: string; token: string };
export type FromThread =
  | { type: 'ready'; backend: string }
  | { type: 'progress'; progress: import('./train-job').JobProgress }
  | { type: 'done'; result: JobResult };

const port = parentPort;
if (!port) throw new Error('runner/job-thread.ts runs only as a worker thread.');
const backend = await initNodeBackend('wasm');
let command: JobCommand | null = null;
const send = (m: FromThread) => port.postMessage(m);

port.on('message', (m: ToThread) => {
  if (m.type === 'command') {
    // A shutdown wins over anything else; pause and stop replace each other.
    if (command !== 'shutdown') command = m.command;
    return;
  }
  if (m.type === 'evaluate') {
    const { job } = m;
    const name = `evaluation of ${job.runName} at step ${job.checkpoint.step}`;
    void evaluateJob(job, new RunnerApi(m.serverUrl, m.token), (stage) => send({
      type: 'progress',
      progress: { runId: job.requestId, runName: name, step: stage.done, steps: stage.total, stepsPerSecond: null, bitsPerChar: null, isBound: null, stage: stage.next },
    })).catch((e: unknown) => ({ runId: job.requestId, status: 'lost' as const, step: 0, reason: (e as Error).message }))
      .then((result) => send({ type: 'done', result }));
    return;
  }
  command = m.command;
  void trainJob(m.job, new RunnerApi(m.serverUrl, m.token), {
    command: () => command,
    onProgress: (progress) => send({ type: 'progress', progress }),
    backend: { backend, simd: backend === 'wasm', threads: 1 },
  }).catch((e: unknown) => ({ runId: m.job.runId, status: 'lost' as const, step: m.job.stepsDone, reason: (e as Error).message }))
    .then((result) => send({ type: 'done', result }));
});
send({ type: 'ready', backend });
