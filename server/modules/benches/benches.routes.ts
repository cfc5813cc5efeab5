/** Benches: list and create under /api/benches; read, rename and delete under /api/benches/:benchId. */
import { Router } from 'express';
import { createBenchSchema, updateBenchSchema } from '../../../shared/api/schemas';
import type { AppContext } from '../../app-context';
import { requireRole } from '../../middleware/bench-access';
import { parseBody } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { ActivityRepository } from '../activity/activity.repository';
import { BenchRepository, toBenchSummary } from './bench.repository';

/** Mounted at /api/benches behind requireAuth. */
export function benchListRoutes(ctx: AppContext): Router {
  const router = Router();

  router.get('/', async (req, res) => {
    res.json(await new BenchRepository(ctx.orm.em).listFor(currentUser(req)));
  });

  router.post('/', async (req, res) => {
    const body = parseBody(createBenchSchema, req.body);
    const user = currentUser(req);
    const now = ctx.clock.now();
    const { bench } = new BenchRepository(ctx.orm.em).create({
      name: body.name,
      description: body.description ?? '',
      owner: user,
      at: now,
    });
    new ActivityRepository(ctx.orm.em).record(bench, user, 'bench.created', `${user.displayName} created the bench "${bench.name}".`, now);
    await ctx.orm.em.flush();
    res.status(201).json(toBenchSummary(bench, 'owner', 1));
  });

  return router;
}

/** Mounted at /api/benches/:benchId after the bench loader. */
export function benchRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });

  router.get('/', requireRole('viewer'), async (req, res) => {
    const { bench, role } = currentBench(req);
    res.json(await new BenchRepository(ctx.orm.em).summary(bench, role));
  });

  router.patch('/', requireRole('owner'), async (req, res) => {
    const body = parseBody(updateBenchSchema, req.body);
    const { bench, role } = currentBench(req);
    const user = currentUser(req);
    const changes: string[] = [];
    if (body.name !== undefined && body.name !== bench.name) {
      changes.push(`renamed the bench from "${bench.name}" to "${body.name}"`);
      bench.name = body.name;
    }
    if (body.description !== undefined && body.description !== bench.description) {
      changes.push('changed the description');
      bench.description = body.description;
    }
    if (changes.length > 0) {
      new ActivityRepository(ctx.orm.em).record(bench, user, 'bench.updated', `${user.displayName} ${changes.join(' and ')}.`, ctx.clock.now());
      await ctx.orm.em.flush();
    }
    res.json(await new BenchRepository(ctx.orm.em).summary(bench, role));
  });

  router.delete('/', requireRole('owner'), async (req, res) => {
    await new BenchRepository(ctx.orm.em).delete(currentBench(req).bench);
    res.status(204).end();
  });

  return router;
}
