/** A stand-in for runner/embedded.ts in the adapter's spec: records the options it was started with. */
export const started: unknown[] = [];
export let stopped = 0;

export function startRunnerThreads(options: unknown): { stop(): Promise<void> } {
  started.push(options);
  return {
    async stop() {
      stopped += 1;
    },
  };
}
