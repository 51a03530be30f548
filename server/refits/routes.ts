/**
 * /api/studies/:studyId/refits: make (lead, statistician), list and read (members), cancel, the
 * summaries and the CSV of a finished (or cancelled) re-fit study. The contract is in shared/refits.ts.
 */
import { Router, type Request } from 'express';
import { createRefitBodySchema, REFIT_INCLUDE, type ParsedCreateRefitBody } from '../../shared/refits';
import { currentStudy, currentUser } from '../auth/context';
import { badRequest, idParam, notFound, validate } from '../errors';
import type { RouteDeps } from '../deps';
import './jobKind';
import { refitRowsCsv, refitSummaryCsv } from './csv';
import { cancelRefit, createRefit, getRefit, listRefits, refitResults, storedRefitRows, type LoadedRefit } from './service';

function includeOf(value: unknown): 'converged' | 'all' {
  if (value === undefined) return 'converged';
  if (typeof value === 'string' && (REFIT_INCLUDE as readonly string[]).includes(value)) return value as 'converged' | 'all';
  throw badRequest(`include must be one of ${REFIT_INCLUDE.join(', ')}.`);
}

export function refitsRouter(deps: RouteDeps): Router {
  const { dataSource, auth } = deps;
  const router = Router();

  const loadRefit = (req: Request): LoadedRefit => {
    const { study } = currentStudy(req);
    const refitId = idParam(req, 'refitId', 'Re-fit study');
    const refit = getRefit(dataSource, study.id, refitId);
    if (!refit) throw notFound('Re-fit study not found.');
    return refit;
  };

  router.get('/:studyId/refits', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    const { study } = currentStudy(req);
    res.json({ refits: listRefits(dataSource, study.id) });
  });

  router.post('/:studyId/refits', auth.requireUser, auth.requireStudyRole('runBatches'), validate(createRefitBodySchema), async (req, res) => {
    const { study } = currentStudy(req);
    const user = currentUser(req);
    const id = await createRefit(dataSource, { studyId: study.id, userId: user.id, body: req.body as ParsedCreateRefitBody });
    res.status(201).json({ refit: getRefit(dataSource, study.id, id)!.summary });
  });

  router.get('/:studyId/refits/:refitId', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    res.json({ refit: loadRefit(req).summary });
  });

  router.post('/:studyId/refits/:refitId/cancel', auth.requireUser, auth.requireStudyRole('runBatches'), async (req, res) => {
    const refit = loadRefit(req);
    await cancelRefit(dataSource, refit);
    res.json({ refit: getRefit(dataSource, refit.row.studyId, refit.row.id)!.summary });
  });

  router.get('/:studyId/refits/:refitId/results', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    const refit = loadRefit(req);
    res.json(refitResults(dataSource, refit, includeOf(req.query.include)));
  });

  router.get('/:studyId/refits/:refitId/results.csv', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    const refit = loadRefit(req);
    const include = includeOf(req.query.include);
    const results = refitResults(dataSource, refit, include);
    const each = req.query.rows === 'each';
    const csv = each ? refitRowsCsv(refit.row.id, refit.models, storedRefitRows(dataSource, refit.row.id)) : refitSummaryCsv(results);
    res
      .status(200)
      .type('text/csv; charset=utf-8')
      .set('Content-Disposition', `attachment; filename="refit-study-${refit.row.id}${each ? '-refits' : ''}.csv"`)
      .send(csv);
  });

  return router;
}
