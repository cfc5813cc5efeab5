/**
 * A runner worker thread: sets up TF.js (WASM, as `npm run train`) once, then trains the jobs the main thread
 * hands it, one at a time. Messages in: `{ type: 'job', job, serverUrl, token }`, `{ type: 'command', command }`;
 * out: `{ type: 'ready', backend }`, `{ type: 'progress', progress }`, `{ type: 'done', result }`.
 */
import { parentPort } from 'node:worker_threads';
import type { RunnerJob } from '../shared/api/runner-jobs';
import { initNodeBackend } from '../shared/node/tf-node';
import { RunnerApi } from './runner-api';
import { trainJob, type JobCommand, type JobResult } from './train-job';

export type ToThread =
  | { type: 'job'; job: RunnerJob; serverUrl: string; token: string; command: JobCommand | null }
  | { type: 'command'; command: JobCommand };
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
  command = m.command;
  void trainJob(m.job, new RunnerApi(m.serverUrl, m.token), {
    command: () => command,
    onProgress: (progress) => send({ type: 'progress', progress }),
    backend: { backend, simd: backend === 'wasm', threads: 1 },
  }).catch((e: unknown) => ({ runId: m.job.runId, status: 'lost' as const, step: m.job.stepsDone, reason: (e as Error).message }))
    .then((result) => send({ type: 'done', result }));
});
send({ type: 'ready', backend });
