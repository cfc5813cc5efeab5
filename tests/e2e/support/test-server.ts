/**
 * Starts the real Noisewright server for an end-to-end test: temporary SQLite file, free HTTP port,
 * local SMTP stand-in on a free port, the built Angular app from dist/. Call `stop()` in `after`.
 */
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { loadConfig } from '../../../server/config';
import { startServer, type RunningServer } from '../../../server/start';

export const BUILT_APP_DIR = resolve('dist/noisewright/browser');

export interface TestServer {
  server: RunningServer;
  url: string;
  stop(): Promise<void>;
}

export async function startTestServer(extraEnv: Record<string, string> = {}): Promise<TestServer> {
  if (!existsSync(join(BUILT_APP_DIR, 'index.html'))) {
    throw new Error(`No built app in ${BUILT_APP_DIR}: run \`npx ng build\` (or \`npm run test:e2e\`) first.`);
  }
  const dir = mkdtempSync(join(tmpdir(), 'noisewright-e2e-'));
  const config = loadConfig({
    NODE_ENV: 'test',
    PORT: '0',
    HOST: '127.0.0.1',
    DATABASE_PATH: join(dir, 'e2e.sqlite'),
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: '0',
    MAIL_CAPTURE: 'true',
    MAIL_CAPTURE_FILE: 'none',
    SEED_DEMO: 'false',
    BCRYPT_COST: '4',
    AUTH_RATE_LIMIT: '1000',
    STATIC_DIR: BUILT_APP_DIR,
    ...extraEnv,
  });
  const server = await startServer(config);
  return {
    server,
    url: server.url,
    async stop() {
      await server.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
