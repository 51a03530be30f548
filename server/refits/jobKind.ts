/**
 * The "refit" job kind: one chunk per re-fit, replication-major (every model's re-fits of panel 1,
 * then of panel 2, ...) so a cancelled study holds a balanced part. Each chunk's result is one row of
 * refit_results, written in the chunk's transaction; a resumed job computes only the chunks without a
 * row, with the same streams, so the stored study is the same as an uninterrupted one.
 */
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { loadStudyData } from '../data/store';
import { registerJobKind, type SyncDb } from '../jobs/registry';
import { fitPeriods } from '../models/modelData';
import type { RefitChunk, RefitChunkResult, RefitContext, RefitJobPayload, StoredRefitModel } from './context';

export const REFIT_JOB_KIND = 'refit';

export function planRefitChunks(payload: RefitJobPayload): { chunk: RefitChunk; units: number }[] {
  const { models, replications, cross } = payload;
  if (!Number.isInteger(models) || models < 1) throw new Error(`refit: models must be a whole number >= 1, got ${String(models)}`);
  if (!Number.isInteger(replications) || replications < 1) throw new Error(`refit: replications must be a whole number >= 1, got ${String(replications)}`);
  const plan: { chunk: RefitChunk; units: number }[] = [];
  for (let replication = 0; replication < replications; replication++) {
    for (let source = 0; source < models; source++) {
      for (let target = 0; target < models; target++) {
        if (!cross && target !== source) continue;
        plan.push({ chunk: { source, target, replication }, units: 1 });
      }
    }
  }
  return plan;
}

interface RefitRowForContext {
  id: number;
  studyId: number;
  seed: number;
  phase3Runs: number;
  models: string;
}

export async function loadRefitContext(dataSource: DataSource, refitId: number): Promise<RefitContext> {
  const rows = (await dataSource.query(`SELECT "id", "studyId", "seed", "phase3Runs", "models" FROM "refits" WHERE "id" = ?`, [refitId])) as RefitRowForContext[];
  const row = rows[0];
  if (!row) throw new Error(`refit: re-fit study ${refitId} no longer exists`);
  const models = JSON.parse(row.models) as StoredRefitModel[];
  const data = await loadStudyData(dataSource, row.studyId);
  return {
    refitId,
    seed: Number(row.seed),
    n: data.actors.length,
    phase3Runs: Number(row.phase3Runs),
    models,
    periods: fitPeriods(data, models[0].spec),
  };
}

const blob = (a: Float64Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

export function storeRefitChunk(db: SyncDb, refitId: number, chunkIndex: number, chunk: RefitChunk, r: RefitChunkResult): void {
  db.prepare(
    `INSERT INTO "refit_results" ("refitId", "chunkIndex", "source", "target", "replication", "finished", "converged", "maxAbsT", "tauMax", "estimates", "ses", "seconds", "error")
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  ).run(
    refitId,
    chunkIndex,
    chunk.source,
    chunk.target,
    chunk.replication,
    r.finished ? 1 : 0,
    r.converged ? 1 : 0,
    r.maxAbsT,
    r.tauMax,
    blob(r.estimates),
    blob(r.ses),
    r.seconds,
    r.error,
  );
}

registerJobKind<RefitJobPayload, RefitChunk, RefitContext, RefitChunkResult>(REFIT_JOB_KIND, {
  planChunks: planRefitChunks,
  workerModule: join(__dirname, 'worker.ts'),
  loadContext: (job, dataSource) => loadRefitContext(dataSource, job.payload.refitId),
  storeChunk: (db, job, chunkIndex, chunk, result) => storeRefitChunk(db, job.payload.refitId, chunkIndex, chunk, result),
  // A cancelled study keeps the re-fits done so far (shown with a caution); a failed one keeps them too.
});
