/**
 * /api/studies/:studyId/batches: make (lead, statistician), list and read (members), cancel, and the
 * goodness-of-fit views of a finished batch. The contract is in shared/batches.ts.
 */
import { Router, type Request } from 'express';
import { createBatchBodySchema, type ParsedCreateBatchBody } from '../../shared/batches';
import type { ApiErrorCode } from '../../shared/api';
import { currentStudy, currentUser } from '../auth/context';
import { ApiError, idParam, notFound, validate } from '../errors';
import type { RouteDeps } from '../deps';
import './jobKind';
import { consensusOf } from './consensus';
import { checkPeriod, checkStatistic, gofSummaryFrom, parseCoverages, periodMatrix, statisticsCsv } from './gof';
import { gofStoreFor } from './gofStore';
import { batchDetail, cancelBatch, createBatch, getBatch, listBatches, type LoadedBatch } from './service';

/** Stored rows of finished batches, kept in memory for the views (results never change once done). */
class MatrixCache {
  private readonly entries = new Map<string, { chains: number; width: number; data: Float64Array }>();
  constructor(private readonly limit = 12) {}
  get(key: string, load: () => { chains: number; width: number; data: Float64Array }) {
    let hit = this.entries.get(key);
    if (hit) {
      this.entries.delete(key);
    } else {
      hit = load();
      if (this.entries.size >= this.limit) this.entries.delete(this.entries.keys().next().value!);
    }
    this.entries.set(key, hit);
    return hit;
  }
}

export function batchesRouter(deps: RouteDeps): Router {
  const { dataSource, auth } = deps;
  const router = Router();
  const cache = new MatrixCache();
  // The GOF of finished batches: computed once in a worker thread and kept (gofStore.ts). Made here so
  // it hears when this app's batches finish.
  const gof = gofStoreFor(dataSource);

  const loadBatch = (req: Request): LoadedBatch => {
    const { study } = currentStudy(req);
    const batchId = idParam(req, 'batchId', 'Batch');
    const batch = getBatch(dataSource, study.id, batchId);
    if (!batch) throw notFound('Batch not found.');
    return batch;
  };
  const finished = (batch: LoadedBatch) => {
    if (batch.summary.state !== 'done') {
      const words: Record<string, string> = {
        queued: 'is still waiting to run',
        running: `is still running (${batch.summary.chainsDone} of ${batch.summary.chainsTotal} chains)`,
        failed: 'failed',
        cancelled: 'was cancelled',
      };
      throw new ApiError(409, 'batch_not_ready', `This batch ${words[batch.summary.state] ?? batch.summary.state}; its results are shown once it is done.`);
    }
  };
  const matrixOf = (batch: LoadedBatch, period: number) => cache.get(`${batch.row.id}:${period}`, () => periodMatrix(dataSource, batch, period));

  router.get('/:studyId/batches', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    const { study } = currentStudy(req);
    res.json({ batches: listBatches(dataSource, study.id) });
  });

  router.post('/:studyId/batches', auth.requireUser, auth.requireStudyRole('runBatches'), validate(createBatchBodySchema), async (req, res) => {
    const { study } = currentStudy(req);
    const user = currentUser(req);
    const id = await createBatch(dataSource, { studyId: study.id, userId: user.id, body: req.body as ParsedCreateBatchBody });
    res.status(201).json({ batch: batchDetail(dataSource, getBatch(dataSource, study.id, id)!) });
  });

  router.get('/:studyId/batches/:batchId', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    res.json({ batch: batchDetail(dataSource, loadBatch(req)) });
  });

  router.post('/:studyId/batches/:batchId/cancel', auth.requireUser, auth.requireStudyRole('runBatches'), async (req, res) => {
    const batch = loadBatch(req);
    await cancelBatch(dataSource, batch);
    res.json({ batch: batchDetail(dataSource, getBatch(dataSource, batch.row.studyId, batch.row.id)!) });
  });

  router.get('/:studyId/batches/:batchId/gof', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const batch = loadBatch(req);
    const period = checkPeriod(batch, req.query.period);
    const statistic = checkStatistic(batch, req.query.statistic);
    const coverages = parseCoverages(req.query.coverage);
    finished(batch);
    const results = await gof.period(batch, period, coverages);
    res.json(results.find((r) => r.gof.statistic === statistic.layout.statistic)!.gof);
  });

  router.get('/:studyId/batches/:batchId/gof/summary', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const batch = loadBatch(req);
    const period = checkPeriod(batch, req.query.period);
    const coverages = parseCoverages(req.query.coverage);
    finished(batch);
    const results = await gof.period(batch, period, coverages);
    res.json(gofSummaryFrom(batch, results.map((r) => r.gof), period, coverages));
  });

  router.get('/:studyId/batches/:batchId/consensus', auth.requireUser, auth.requireStudyRole('read'), async (req, res) => {
    const batch = loadBatch(req);
    const period = checkPeriod(batch, req.query.period);
    finished(batch);
    res.json(await consensusOf(dataSource, batch, period, { threshold: req.query.threshold, top: req.query.top }));
  });

  router.get('/:studyId/batches/:batchId/statistics.csv', auth.requireUser, auth.requireStudyRole('read'), (req, res) => {
    const batch = loadBatch(req);
    const period = checkPeriod(batch, req.query.period);
    const statistic = checkStatistic(batch, req.query.statistic);
    finished(batch);
    const csv = statisticsCsv(batch, matrixOf(batch, period), statistic, period);
    res
      .status(200)
      .type('text/csv; charset=utf-8')
      .set('Content-Disposition', `attachment; filename="batch-${batch.row.id}-${statistic.layout.statistic}-period-${period}.csv"`)
      .send(csv);
  });

  return router;
}
