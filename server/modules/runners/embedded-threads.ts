/**
 * The server's own runner threads (embedded default): `startRunnerThreads` of the runner program
 * (runner/embedded.ts), loaded on demand so the server starts even when that program is not part of the
 * build. The threads talk to this server over its REST API with the token of the built-in embedded runner.
 */
export interface RunnerThreadsOptions {
  serverUrl: string;
  token: string;
  threads: number;
  name: string;
  queueUrl?: string;
}

export interface RunnerThreads {
  stop(): Promise<void>;
}

type StartRunnerThreads = (options: RunnerThreadsOptions) => Promise<RunnerThreads> | RunnerThreads;

/** Where the runner program's entry for embedded threads lives (relative to this file). */
export const RUNNER_EMBEDDED_MODULE = '../../../runner/embedded';

/**
 * Starts the threads, or returns null (with one clear log line) when the runner program is missing.
 * `specifier` is for tests (another module with the same export).
 */
export async function startEmbeddedRunnerThreads(
  options: RunnerThreadsOptions,
  log: (line: string) => void = console.warn,
  specifier: string = RUNNER_EMBEDDED_MODULE,
): Promise<RunnerThreads | null> {
  // A variable specifier keeps the type check and bundlers from requiring the module at build time.
  let loaded: { startRunnerThreads?: StartRunnerThreads };
  try {
    loaded = (await import(specifier)) as { startRunnerThreads?: StartRunnerThreads };
  } catch (error) {
    const e = error as NodeJS.ErrnoException;
    const base = specifier.split('/').pop()!;
    if ((e.code === 'ERR_MODULE_NOT_FOUND' || e.code === 'MODULE_NOT_FOUND') && String(e.message).includes(base)) {
      log(`Runner threads are off: the runner program (${specifier}) is not in this build. Runs sent to runners wait for \`npm run runner\`.`);
      return null;
    }
    throw error;
  }
  if (typeof loaded.startRunnerThreads !== 'function') {
    log(`Runner threads are off: ${specifier} does not export startRunnerThreads.`);
    return null;
  }
  return await loaded.startRunnerThreads(options);
}
