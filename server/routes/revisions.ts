import { Router } from 'express';
import { runAnalysisRequestSchema } from '../../lib/contracts/designs';
import { requestReviewRequestSchema } from '../../lib/contracts/reviews';
import { ALL_ROLES, actor, bindResourceParams, currentTeam, requireRole, resourceId } from '../auth/middleware';
import type { AppContext } from '../context';
import { buildMarginReport } from '../reports/marginReport';
import { exportRevisionJson, waveformsCsv } from '../reports/exports';
import { runAnalysis } from '../services/analyses';
import { auditFrom, recordAudit } from '../services/audit';
import { requestReview } from '../services/reviews';
import { getRevision, getRevisionRow, verifyRevision } from '../services/revisions';

/** A file name made of safe characters only, for Content-Disposition. */
const fileName = (name: string, sequence: number, ext: string) =>
  `${name.replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^-+|-+$/g, '') || 'design'}-r${sequence}.${ext}`;

export function revisionsRouter(ctx: AppContext): Router {
  const router = Router();
  bindResourceParams(router, ctx);

  router.get('/revisions/:revisionId', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await getRevision(ctx, currentTeam(req).id, resourceId(req)));
  });

  router.get('/revisions/:revisionId/verify', requireRole(...ALL_ROLES), async (req, res) => {
    res.json(await verifyRevision(ctx, currentTeam(req).id, resourceId(req)));
  });

  router.get('/revisions/:revisionId/analyses', requireRole(...ALL_ROLES), async (req, res) => {
    res.json({ items: (await getRevision(ctx, currentTeam(req).id, resourceId(req))).analyses });
  });

  router.post('/revisions/:revisionId/analyses', requireRole('engineer'), async (req, res) => {
    const body = runAnalysisRequestSchema.parse(req.body);
    const revision = await getRevisionRow(ctx, currentTeam(req).id, resourceId(req));
    const run = await runAnalysis(ctx, revision, body.kind, body.options, actor(req).id, auditFrom(req));
    // A spread not in the cache is queued: 202 with the job to poll (GET /api/analysis-jobs/:jobId).
    if ('job' in run) res.status(202).json(run);
    else res.status(run.cached ? 200 : 201).json(run);
  });

  router.post('/revisions/:revisionId/reviews', requireRole('engineer'), async (req, res) => {
    const body = requestReviewRequestSchema.parse(req.body);
    const created = await requestReview(ctx, currentTeam(req).id, resourceId(req), { ...actor(req) }, body, auditFrom(req));
    res.status(201).json({ items: created });
  });

  router.get('/revisions/:revisionId/report.pdf', requireRole(...ALL_ROLES), async (req, res) => {
    const report = await buildMarginReport(ctx, currentTeam(req).id, resourceId(req));
    await recordAudit(ctx.db, {
      ...auditFrom(req),
      action: 'report.downloaded',
      entity: { type: 'revision', id: report.revisionId },
      details: { sha256: report.sha256, format: 'pdf' },
    });
    res.setHeader('Content-Type', 'application/pdf');
    res.setHeader('Content-Disposition', `attachment; filename="${fileName(report.designName, report.sequence, 'pdf')}"`);
    res.send(report.pdf);
  });

  router.get('/revisions/:revisionId/waveforms.csv', requireRole(...ALL_ROLES), async (req, res) => {
    const csv = await waveformsCsv(ctx, currentTeam(req).id, resourceId(req));
    await recordAudit(ctx.db, {
      ...auditFrom(req),
      action: 'revision.exported',
      entity: { type: 'revision', id: csv.revisionId },
      details: { format: 'csv' },
    });
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="${fileName(csv.designName, csv.sequence, 'csv')}"`);
    res.send(csv.text);
  });

  router.get('/revisions/:revisionId/export.json', requireRole(...ALL_ROLES), async (req, res) => {
    const exported = await exportRevisionJson(ctx, currentTeam(req).id, resourceId(req));
    await recordAudit(ctx.db, {
      ...auditFrom(req),
      action: 'revision.exported',
      entity: { type: 'revision', id: exported.revision.id },
      details: { format: 'json' },
    });
    res.setHeader(
      'Content-Disposition',
      `attachment; filename="${fileName(exported.design.name, exported.revision.sequence, 'json')}"`,
    );
    res.json(exported);
  });

  return router;
}
