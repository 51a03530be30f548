/**
 * The fit report of a batch (contract in shared/review.ts): its status and sign-offs, the lead's
 * sign-off (ability signReport; recorded with who and when, and the team is notified; a report with
 * concerns (non-converged fit, few chains) needs an acknowledged reason, see signoffGuard.ts), and the
 * exports: PDF (pdfkit, fonts embedded), CSV and JSON. Mounted at /api.
 */
import { Router, type Request } from 'express';
import { can } from '../../shared/api';
import { parseIdList, signoffBodySchema, type ReportStatus, type SignoffBody } from '../../shared/review';
import { currentStudy, currentUser } from '../auth/context';
import { badRequest, idParam, validate } from '../errors';
import { syncDb } from '../db/sync';
import type { RouteDeps } from '../deps';
import { GofCache } from '../review/gofData';
import type { ReviewRouter } from '../review/routes';
import { changedSince, loadReviewBatch, requireDone, verdictCounts } from '../review/service';
import { signOff, signoffsOf } from '../review/signoffs';
import { estimatesCsv, gofCsv } from './csv';
import { reportPdf } from './pdf';
import { acknowledgementFor, concernsOf } from './signoffGuard';
import { buildReport } from './reportData';
import { getRefit, refitResults } from '../refits/service';
import type { RefitResults } from '../../shared/refits';
import type { DataSource } from 'typeorm';

/** The re-fit study the lead chose to include (?refit=ID), summarised over its converged re-fits; null without one. */
function refitOf(dataSource: DataSource, req: Request): RefitResults | null {
  const raw = req.query.refit;
  if (raw === undefined || raw === '') return null;
  if (typeof raw !== 'string' || !/^[1-9][0-9]{0,15}$/.test(raw)) throw badRequest('refit is the id of a re-fit study.');
  const refit = getRefit(dataSource, currentStudy(req).study.id, Number(raw));
  if (!refit) throw badRequest(`Re-fit study ${raw} is not in this study.`);
  return refitResults(dataSource, refit, 'converged');
}

function compareIds(req: Request): number[] {
  try {
    return parseIdList(req.query.compare, 'Batches to compare');
  } catch (e) {
    throw badRequest((e as Error).message);
  }
}

function fileName(studyName: string, batchId: number, ext: string): string {
  const slug = studyName.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40) || 'study';
  return `wavefit-report-${slug}-batch-${batchId}.${ext}`;
}

export function reportsRouter(deps: RouteDeps, review: Pick<ReviewRouter, 'notifier'>): Router {
  const { dataSource, auth } = deps;
  const router = Router();
  const gof = new GofCache();
  const B = '/studies/:studyId/batches/:batchId';
  const member = (ability: Parameters<typeof auth.requireStudyRole>[0]) => [auth.requireUser, auth.requireStudyRole(ability)];
  const batchOf = (req: Request) => loadReviewBatch(dataSource, currentStudy(req).study.id, idParam(req, 'batchId', 'Batch'));

  router.get(`${B}/report`, ...member('read'), (req, res) => {
    const batch = batchOf(req);
    const db = syncDb(dataSource);
    const signoffs = signoffsOf(db, batch.row.id);
    const { role } = currentStudy(req);
    const body: ReportStatus = {
      batchId: batch.row.id,
      batchLabel: batch.row.label,
      state: batch.summary.state,
      counts: verdictCounts(db, batch),
      signoffs,
      changedSinceSignoff: changedSince(db, batch.row.id, signoffs[0]),
      canSign: currentUser(req).isAdmin || can(role, 'signReport'),
      concerns: concernsOf(dataSource, batch),
    };
    res.json(body);
  });

  router.post(`${B}/report/signoff`, ...member('signReport'), validate(signoffBodySchema), async (req, res) => {
    const body = req.body as SignoffBody & { note: string };
    const batch = batchOf(req);
    requireDone(batch);
    // A non-converged fit or a batch with few chains is signed off only with an acknowledged reason.
    const acknowledgement = acknowledgementFor(concernsOf(dataSource, batch), body);
    const signoff = await signOff(dataSource, batch, currentUser(req), body.note, acknowledgement);
    await review.notifier.flush();
    res.status(201).json({ signoff });
  });

  router.get(`${B}/report.json`, ...member('read'), async (req, res) => {
    await gof.prepare(dataSource, batchOf(req));
    const report = buildReport(dataSource, gof, batchOf(req), compareIds(req), refitOf(dataSource, req));
    res.set('Content-Disposition', `attachment; filename="${fileName(report.study.name, report.batch.id, 'json')}"`).json(report);
  });

  router.get(`${B}/report.csv`, ...member('read'), async (req, res) => {
    await gof.prepare(dataSource, batchOf(req));
    const table = req.query.table === undefined || req.query.table === '' ? 'gof' : String(req.query.table);
    if (table !== 'gof' && table !== 'estimates') throw badRequest('The table is "gof" (envelopes, p-values and verdicts) or "estimates".');
    const report = buildReport(dataSource, gof, batchOf(req), []);
    res
      .status(200)
      .type('text/csv; charset=utf-8')
      .set('Content-Disposition', `attachment; filename="${fileName(report.study.name, report.batch.id, table === 'gof' ? 'csv' : 'estimates.csv')}"`)
      .send(table === 'gof' ? gofCsv(report) : estimatesCsv(report));
  });

  router.get(`${B}/report.pdf`, ...member('read'), async (req, res) => {
    await gof.prepare(dataSource, batchOf(req));
    const report = buildReport(dataSource, gof, batchOf(req), compareIds(req), refitOf(dataSource, req));
    const pdf = await reportPdf(report);
    res
      .status(200)
      .type('application/pdf')
      .set('Content-Disposition', `${req.query.download === '1' ? 'attachment' : 'inline'}; filename="${fileName(report.study.name, report.batch.id, 'pdf')}"`)
      .send(pdf);
  });

  return router;
}
