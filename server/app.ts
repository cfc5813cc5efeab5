/**
 * Builds the Express app from a config and its services; does not listen (see start.ts / main.ts).
 * Order: security headers → /api (JSON body, ORM request context, module routers, JSON 404) →
 * the built Angular app with an index.html fallback → the one error middleware.
 */
import { RequestContext } from '@mikro-orm/core';
import express, { Router, type Express } from 'express';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { AppContext, AppDeps } from './app-context';
import { systemClock } from './clock';
import type { Config } from './config';
import { requireAuth } from './middleware/auth';
import { loadBench } from './middleware/bench-access';
import { apiNotFound, errorHandler } from './middleware/error-handler';
import { securityHeaders } from './middleware/security-headers';
import { textGuard } from './middleware/text-guard';
import { requestGate } from './middleware/request-gate';
import { createLogger, loggerOf, requestLogger, safeError } from './logging';
import { cancelWorkOnClose } from './middleware/client-gone';
import { configureCpuPool } from './workers/cpu-pool';
import { AdminSetup } from './modules/auth/admin-setup';
import { serverModules } from './modules/registry';
import { EmbeddedRunQueue } from './modules/runners/queue/run-queue';
import { RunEventBus } from './modules/runners/run-events';
import { RunnerWakeup } from './modules/runners/runner-wakeup';
import { ErrorCode } from '../shared/api/errors';
import { HttpError } from './http-error';
import './request-state';

/** The context route factories and background checks receive, from a config and the app's services. */
export function appContext(config: Config, deps: AppDeps): AppContext {
  const logger = deps.logger ?? createLogger(config.logLevel);
  return {
    config,
    orm: deps.orm,
    mailer: deps.mailer,
    mailbox: deps.mailbox ?? null,
    clock: deps.clock ?? systemClock,
    logger,
    adminSetup: deps.adminSetup ?? new AdminSetup(config),
    logError: (error, req) => {
      loggerOf(req, logger).error({ err: safeError(error) }, 'server fault');
      deps.logError?.(error, req);
    },
    runQueue: deps.runQueue ?? new EmbeddedRunQueue(),
    runEvents: deps.runEvents ?? new RunEventBus(),
    runnerWakeup: deps.runnerWakeup ?? new RunnerWakeup(),
  };
}

export function createApp(config: Config, deps: AppDeps): Express {
  if (config.queueUrl && !deps.runQueue) throw new Error('createApp: QUEUE_URL is set; pass the BullMQ run queue (createRunQueue) in deps.runQueue.');
  configureCpuPool({ threads: config.workerThreads, queueLimit: config.workerQueueLimit });
  const ctx = appContext(config, deps);
  const logger = ctx.logger;
  const app = express();
  app.disable('x-powered-by');
  app.use(requestLogger(logger));
  app.use(cancelWorkOnClose);
  if (config.trustProxyHops > 0) app.set('trust proxy', config.trustProxyHops);
  app.use(securityHeaders({ https: config.publicUrl.startsWith('https:') }));

  const api = Router();
  api.use(express.json({ limit: config.jsonBodyLimitBytes }));
  // Health and config never wait; an event stream gives its place back once it starts (request-gate.ts).
  // File uploads do not take a place either: a slow or stalled sender would hold it for as long as its body
  // trickles in (minutes), and their heavy steps are bounded elsewhere (parsing in the worker pool's queue,
  // words written in small statements).
  api.use(requestGate(config.apiConcurrency, (req) => req.path === '/health' || req.path === '/config' || req.is('multipart/form-data') === 'multipart/form-data'));
  api.use(textGuard);
  api.use((_req, _res, next) => RequestContext.create(ctx.orm.em, next));
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });

  const signedIn = requireAuth(ctx);
  const bench = Router({ mergeParams: true });
  for (const module of serverModules) {
    for (const mount of module.benchRoutes ?? []) bench.use(mount.path, mount.router(ctx));
  }
  api.use('/benches/:benchId', signedIn, loadBench(ctx), bench);
  for (const module of serverModules) {
    for (const mount of module.routes ?? []) {
      if (mount.signedIn) api.use(mount.path, signedIn, mount.router(ctx));
      else api.use(mount.path, mount.router(ctx));
    }
  }
  api.use(apiNotFound);
  app.use('/api', api);

  serveClient(app, resolve(config.staticDir));
  app.use((req, _res, next) => {
    next(new HttpError(404, ErrorCode.NotFound, `Nothing here answers ${req.method} ${req.path}.`));
  });
  app.use(errorHandler(ctx.logError));
  return app;
}

/** Serves the built Angular app; every other GET that is not a file gets index.html (client routing). */
function serveClient(app: Express, dir: string): void {
  const index = join(dir, 'index.html');
  if (existsSync(index)) {
    app.use(express.static(dir, { index: false, maxAge: '1h' }));
    app.get(['/', '/*splat'], (req, res, next) => {
      // A missing file (a name with an extension) is a 404, not the app page: a wrong wasm path should fail loudly.
      if (/\.[A-Za-z0-9]+$/.test(req.path)) {
        next();
        return;
      }
      res.set('Cache-Control', 'no-cache');
      res.sendFile(index);
    });
  } else {
    app.get(['/', '/*splat'], (_req, res) => {
      res.status(404).type('text/plain').send('The web app is not built yet: run `npm run build`, then reload.');
    });
  }
}
