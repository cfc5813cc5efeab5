/** /api/benches/:benchId/activity: the paged activity log (owners and coaches). */
import { Router } from 'express';
import { pageQuerySchema } from '../../../shared/api/schemas';
import type { AppContext } from '../../app-context';
import { requireRole } from '../../middleware/bench-access';
import { parseQuery } from '../../middleware/validate';
import { currentBench } from '../../request-state';
import { ActivityRepository } from './activity.repository';

export function activityRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });
  router.get('/', requireRole('coach'), async (req, res) => {
    const { limit, offset } = parseQuery(pageQuerySchema, req.query);
    res.json(await new ActivityRepository(ctx.orm.em).page(currentBench(req).bench, limit, offset));
  });
  return router;
}
