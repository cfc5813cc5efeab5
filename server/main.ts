/** `tsx server/main.ts`: reads the environment, starts the server, prints where it is. */
import { ConfigError, loadConfig, type Config } from './config';

let config: Config;
try {
  config = loadConfig(process.env);
} catch (error) {
  if (error instanceof ConfigError) {
    console.error(error.message);
    process.exit(1);
  }
  throw error;
}

// Loaded after the configuration is known to be good, so a bad variable is reported at once.
const { startServer } = await import('./start');
let running: Awaited<ReturnType<typeof startServer>>;
try {
  running = await startServer(config);
} catch (error) {
  const e = error as NodeJS.ErrnoException & { port?: number; address?: string };
  if (e.code === 'EADDRINUSE') {
    console.error(`Port ${e.port} on ${e.address} is taken: stop the other program, or set PORT (web) / SMTP_PORT (mail stand-in).`);
  } else {
    console.error('Noisewright could not start:', error);
  }
  process.exit(1);
}
console.log(`Noisewright is running at ${running.config.publicUrl} (${running.config.env}).`);
console.log(`Database: ${running.config.databasePath}`);
if (running.mailbox) {
  console.log(`Mail stand-in on ${running.config.smtp.host}:${running.config.smtp.port}; admins read captured mail on the admin page.`);
}
console.log(
  running.runnerThreads > 0
    ? `Runner threads: ${running.runnerThreads} (queue: ${running.config.queueUrl ? 'BullMQ on Redis' : 'embedded'}).`
    : `No runner threads in this server (RUNNER_THREADS=${running.config.runnerThreads}); runs sent to runners wait for \`npm run runner\`.`,
);
if (running.config.devMode && running.config.seedDemo) {
  console.log(`Demo sign-in: ${running.config.demoEmail} / ${running.config.demoPassword}${running.seeded ? ' (demo data created)' : ''}`);
}

let stopping = false;
const stop = (signal: string) => {
  if (stopping) return;
  stopping = true;
  console.log(`${signal}: shutting down.`);
  running.close().then(
    () => process.exit(0),
    (error: unknown) => {
      console.error(error);
      process.exit(1);
    },
  );
};
process.on('SIGINT', () => stop('SIGINT'));
process.on('SIGTERM', () => stop('SIGTERM'));
