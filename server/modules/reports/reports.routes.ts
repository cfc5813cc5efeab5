/**
 * Reports, mounted at /api/benches/:benchId/reports: create (the server freezes the figures of the
 * sources), list (paged, newest first), read, CSV and JSON exports, delete. Viewers read and export; members create reports;
 * the creator, coaches and owners delete them. The client shows a report at `/benches/:benchId/reports/:reportId`.
 */
import { Router, type Request } from 'express';
import { createReportSchema, REPORT_CSV_HEADER, reportLink, type ReportDto, type ReportPage, type ReportSummaryDto } from '../../../shared/api/reports';
import { pageQuerySchema } from '../../../shared/api/schemas';
import { roleAtLeast } from '../../../shared/api/types';
import type { AppContext } from '../../app-context';
import { notFound, roleTooLow } from '../../http-error';
import { toCsv } from '../../http/csv';
import { requireRole } from '../../middleware/bench-access';
import { parseBody, parseQuery } from '../../middleware/validate';
import { currentBench, currentUser } from '../../request-state';
import { ActivityRepository } from '../activity/activity.repository';
import { reportFileStem } from './report-file-name';
import { buildSnapshot } from './report-snapshot';
import { Report } from './report.entity';
import { UUID } from '../../ids';

function summaryOf(r: Report): ReportSummaryDto {
  return {
    id: r.id, benchId: r.bench.id, kind: r.kind, title: r.title, sourceIds: r.sourceIds,
    createdBy: r.createdBy ? { id: r.createdBy.id, displayName: r.createdBy.displayName } : null,
    createdAt: r.createdAt.toISOString(), link: reportLink(r.bench.id, r.id),
  };
}

const dtoOf = (r: Report): ReportDto => ({ ...summaryOf(r), snapshot: r.snapshot });

/** A file name from the title: letters, digits and dashes only. */
function fileStem(r: Report): string {
  return reportFileStem(r.title);
}

export function reportRoutes(ctx: AppContext): Router {
  const router = Router({ mergeParams: true });

  async function loadReport(req: Request): Promise<Report> {
    const id = String(req.params['reportId'] ?? '');
    const found = UUID.test(id)
      ? await ctx.orm.em.findOne(Report, { id, bench: currentBench(req).bench }, { populate: ['createdBy', 'snapshot'] })
      : null;
    if (!found) throw notFound('This report');
    return found;
  }

  router.get('/', requireRole('viewer'), async (req, res) => {
    const { limit, offset } = parseQuery(pageQuerySchema, req.query);
    const [list, total] = await ctx.orm.em.findAndCount(
      Report,
      { bench: currentBench(req).bench },
      { orderBy: { createdAt: 'desc', id: 'asc' }, populate: ['createdBy'], limit, offset },
    );
    res.json({ items: list.map(summaryOf), total } satisfies ReportPage);
  });

  router.post('/', requireRole('member'), async (req, res) => {
    const body = parseBody(createReportSchema, req.body);
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    const snapshot = await buildSnapshot(ctx.orm.em, bench, me, role, body.kind, body.sourceIds);
    const now = ctx.clock.now();
    const report = ctx.orm.em.create(Report, { bench, kind: body.kind, title: body.title, sourceIds: body.sourceIds, snapshot, createdBy: me, createdAt: now });
    new ActivityRepository(ctx.orm.em).record(bench, me, 'report.created', `${me.displayName} made the ${body.kind} report "${body.title}".`, now);
    await ctx.orm.em.flush();
    res.status(201).json(dtoOf(report));
  });

  router.get('/:reportId', requireRole('viewer'), async (req, res) => {
    res.json(dtoOf(await loadReport(req)));
  });

  router.get('/:reportId/export.csv', requireRole('viewer'), async (req, res) => {
    const report = await loadReport(req);
    res.type('text/csv; charset=utf-8; header=present');
    res.attachment(`${fileStem(report)}.csv`);
    res.send(toCsv([REPORT_CSV_HEADER, ...report.snapshot.figures.map((x) => [x.section, x.name, x.setting, x.value, x.unit])]));
  });

  router.get('/:reportId/export.json', requireRole('viewer'), async (req, res) => {
    const report = await loadReport(req);
    res.attachment(`${fileStem(report)}.json`);
    res.type('application/json; charset=utf-8');
    res.send(JSON.stringify(dtoOf(report), null, 2));
  });

  router.delete('/:reportId', requireRole('member'), async (req, res) => {
    const report = await loadReport(req);
    const { bench, role } = currentBench(req);
    const me = currentUser(req);
    if (!roleAtLeast(role, 'coach') && report.createdBy?.id !== me.id) {
      throw roleTooLow(`Only the person who made "${report.title}", a coach or an owner may delete it; ask one of them.`);
    }
    await ctx.orm.em.nativeDelete(Report, { id: report.id });
    ctx.orm.em.getUnitOfWork().unsetIdentity(report);
    new ActivityRepository(ctx.orm.em).record(bench, me, 'report.deleted', `${me.displayName} deleted the report "${report.title}".`, ctx.clock.now());
    await ctx.orm.em.flush();
    res.status(204).end();
  });

  return router;
}
