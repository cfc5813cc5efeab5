/** What the server loads for its embedded runner threads (server/modules/runners/embedded-threads.ts). */
export { startRunnerThreads, type RunnerHandle, type RunnerOptions } from './runner';
