/**
 * The "fit" job kind: one chunk per fit (the Robbins-Monro phases are sequential), computed by
 * ./fitWorker.ts in a worker thread of the job queue; the results are written into the fit's row in
 * the queue's transaction, and a failure or cancellation is recorded there with its reason (no
 * estimates are stored then).
 */
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import type { FitResults } from '../../shared/models';
import { loadStudyData } from '../data/store';
import { registerJobKind, type SyncDb } from '../jobs/registry';
import { sqlNow } from '../db/sync';
import type { FitContext, FitJobPayload, StoredFitPlan } from './context';
import { fitPeriods, type StoredSpec } from './modelData';
import { fitWorkPlan } from './progress';

export const FIT_JOB_KIND = 'fit';

interface FitRowForContext {
  id: number;
  studyId: number;
  seed: number;
  phase3Runs: number;
  spec: string;
  plan: string;
}

export async function loadFitContext(dataSource: DataSource, fitId: number): Promise<FitContext> {
  const rows = (await dataSource.query(
    `SELECT "id", "studyId", "seed", "phase3Runs", "spec", "plan" FROM "fits" WHERE "id" = ?`,
    [fitId],
  )) as FitRowForContext[];
  const fit = rows[0];
  if (!fit) throw new Error(`fit: fit ${fitId} no longer exists`);
  const spec = JSON.parse(fit.spec) as StoredSpec;
  const plan = JSON.parse(fit.plan) as StoredFitPlan;
  const data = await loadStudyData(dataSource, fit.studyId);
  return {
    fitId,
    n: data.actors.length,
    seed: Number(fit.seed),
    phase3Runs: Number(fit.phase3Runs),
    spec,
    periods: fitPeriods(data, spec),
    startValues: plan.startValues,
    initialDerivative: plan.initialDerivative,
  };
}

/** The reason a user reads: the queue's "chunk 0 failed: estimate: " prefix removed. */
export function plainReason(reason: string): string {
  return reason.replace(/^chunk \d+ failed: /, '').replace(/^estimate: /, '');
}

registerJobKind<FitJobPayload, Record<string, never>, FitContext, FitResults>(FIT_JOB_KIND, {
  planChunks(payload) {
    const plan = fitWorkPlan(payload.p, payload.phase3Runs, payload.skipPhase1);
    return [{ chunk: {}, units: plan.total }];
  },
  workerModule: join(__dirname, 'fitWorker.ts'),
  loadContext: (job, dataSource) => loadFitContext(dataSource, job.payload.fitId),
  storeChunk(db: SyncDb, job, _chunkIndex, _chunk, result) {
    db.prepare(`UPDATE "fits" SET "state" = 'done', "results" = ?, "error" = NULL, "finishedAt" = ? WHERE "id" = ?`).run(
      JSON.stringify(result),
      sqlNow(),
      job.payload.fitId,
    );
  },
  onEnd(db, job, state, reason) {
    db.prepare(`UPDATE "fits" SET "state" = ?, "results" = NULL, "error" = ?, "finishedAt" = ? WHERE "id" = ?`).run(
      state,
      state === 'failed' ? plainReason(reason) : null,
      sqlNow(),
      job.payload.fitId,
    );
  },
});
