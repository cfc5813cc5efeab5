/** `npm run runner -- --server <url> --token <token> [--queue redis://…] [--threads N] [--name NAME]` (see --help). */
import { parseRunnerArgs, RUNNER_HELP } from './runner-options';
import { startRunnerThreads } from './runner';

let options;
try {
  options = parseRunnerArgs(process.argv.slice(2), process.env);
} catch (e) {
  process.stderr.write(`runner: ${(e as Error).message}\n`);
  process.exit(2);
}
if (!options) {
  process.stdout.write(RUNNER_HELP);
} else {
  const runner = startRunnerThreads(options);
  let signals = 0;
  const shutdown = (signal: string) => {
    signals++;
    if (signals > 1) {
      process.stderr.write(`runner: ${signal} again, ending without handing the jobs back.\n`);
      process.exit(130);
    }
    process.stderr.write(`runner: ${signal}: saving a checkpoint of every job and handing it back…\n`);
    void runner.stop().then(() => process.exit(0), (e: unknown) => {
      process.stderr.write(`runner: ${(e as Error).message}\n`);
      process.exit(1);
    });
  };
  void runner.refused.then((reason) => {
    process.stderr.write(`runner: stopped, the server refused the token: ${reason}\nStart the runner again with a valid token (an admin makes one on the Runners page).\n`);
    process.exit(3);
  });
  process.on('SIGINT', () => shutdown('SIGINT'));
  process.on('SIGTERM', () => shutdown('SIGTERM'));
}
