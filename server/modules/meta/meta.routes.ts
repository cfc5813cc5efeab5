/** /api/health and /api/config. */
import { Router } from 'express';
import type { PublicConfig } from '../../../shared/api/types';
import type { AppContext } from '../../app-context';

export function metaRoutes(ctx: AppContext): Router {
  const router = Router();
  router.get('/health', (_req, res) => {
    res.json({ ok: true });
  });
  router.get('/config', (_req, res) => {
    const answer: PublicConfig = { devMode: ctx.config.devMode, maxUploadBytes: ctx.config.maxUploadBytes };
    if (ctx.config.devMode && ctx.config.seedDemo) {
      answer.demoSignIn = { email: ctx.config.demoEmail, password: ctx.config.demoPassword };
    }
    res.json(answer);
  });
  return router;
}
