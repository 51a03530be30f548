/**
 * The "batch" job kind: chunks of CHAINS_PER_CHUNK chains (every period of the batch in each chunk),
 * computed by ./worker.ts, stored as one statistics blob per chunk and period plus per-tie counts
 * summed into one row per period, all in the chunk's transaction.
 */
import { batchDone } from './gofHooks';
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { CHAINS_PER_CHUNK, type BatchModel } from '../../shared/batches';
import type { AuxStatisticId } from '../../shared/auxStatistics';
import { loadStudyData } from '../data/store';
import { registerJobKind, type SyncDb } from '../jobs/registry';
import { recordBatchEnded } from '../notify/notifier';
import type { BatchChunk, BatchChunkResult, BatchContext } from './context';
import { auxOptionsOf, buildLayout, layoutOffsets, type ResolvedMaxima } from './layout';
import { periodCovariates, periodNetworks } from '../data/periods';

export const BATCH_JOB_KIND = 'batch';

export interface BatchJobPayload {
  batchId: number;
  chains: number;
  periods: number;
}

export function planBatchChunks(payload: BatchJobPayload): { chunk: BatchChunk; units: number }[] {
  const { chains, periods } = payload;
  if (!Number.isInteger(chains) || chains < 1) throw new Error(`batch: chains must be a whole number >= 1, got ${String(chains)}`);
  if (!Number.isInteger(periods) || periods < 1) throw new Error(`batch: periods must be a whole number >= 1, got ${String(periods)}`);
  const plan: { chunk: BatchChunk; units: number }[] = [];
  for (let first = 0; first < chains; first += CHAINS_PER_CHUNK) {
    const count = Math.min(CHAINS_PER_CHUNK, chains - first);
    plan.push({ chunk: { firstChain: first, chains: count }, units: count * periods });
  }
  return plan;
}

interface BatchRowForContext {
  id: number;
  studyId: number;
  model: string;
  periods: string;
  seed: number;
  statistics: string;
  maxima: string;
}

/** Builds the workers' context of a batch from its row and the study's stored data. */
export async function loadBatchContext(dataSource: DataSource, batchId: number): Promise<BatchContext> {
  const rows = (await dataSource.query(
    `SELECT "id", "studyId", "model", "periods", "seed", "statistics", "maxima" FROM "batches" WHERE "id" = ?`,
    [batchId],
  )) as BatchRowForContext[];
  const batch = rows[0];
  if (!batch) throw new Error(`batch: batch ${batchId} no longer exists`);
  const model = JSON.parse(batch.model) as BatchModel;
  const periods = JSON.parse(batch.periods) as number[];
  const statistics = JSON.parse(batch.statistics) as AuxStatisticId[];
  const maxima = JSON.parse(batch.maxima) as ResolvedMaxima;
  const data = await loadStudyData(dataSource, batch.studyId);
  const networks = periodNetworks(data);
  const covariates = periodCovariates(data);
  const { width } = layoutOffsets(buildLayout(statistics, maxima));
  const options = auxOptionsOf(maxima);
  return {
    batchId,
    seed: Number(batch.seed),
    n: data.actors.length,
    statistics,
    maxDegree: options.maxDegree,
    maxDistance: options.maxDistance,
    width,
    effects: model.effects.map((e) => (e.covariate ? { id: e.id, covariate: e.covariate } : { id: e.id })),
    params: model.effects.map((e) => e.value),
    periods: periods.map((p) => {
      const net = networks[p - 1];
      if (!net) throw new Error(`batch: the study has no period ${p} any more`);
      const rate = model.rates[p - 1];
      if (rate == null) throw new Error(`batch: the model has no rate for period ${p}`);
      return {
        period: p,
        rate,
        start: net.start,
        end: net.end,
        endMissing: net.endMissing,
        free: net.free,
        active: net.active,
        covariates: covariates[p - 1].values,
        centring: covariates[p - 1].centring,
      };
    }),
  };
}

function toBuffer(view: ArrayBufferView): Buffer {
  return Buffer.from(view.buffer, view.byteOffset, view.byteLength);
}

/** Copies a stored blob into a fresh, aligned typed array. */
export function int32FromBlob(blob: Buffer): Int32Array {
  const out = new Int32Array(blob.byteLength / 4);
  new Uint8Array(out.buffer).set(blob);
  return out;
}
export function float64FromBlob(blob: Buffer): Float64Array {
  const out = new Float64Array(blob.byteLength / 8);
  new Uint8Array(out.buffer).set(blob);
  return out;
}

export function storeBatchChunk(db: SyncDb, batchId: number, chunkIndex: number, chunk: BatchChunk, result: BatchChunkResult): void {
  const insert = db.prepare(
    `INSERT INTO "batch_results" ("batchId", "period", "chunkIndex", "firstChain", "chains", "data") VALUES (?, ?, ?, ?, ?, ?)`,
  );
  const readCounts = db.prepare(`SELECT "counts", "networks", "tieTotal" FROM "batch_tie_counts" WHERE "batchId" = ? AND "period" = ?`);
  const writeCounts = db.prepare(`UPDATE "batch_tie_counts" SET "counts" = ?, "networks" = ?, "tieTotal" = ? WHERE "batchId" = ? AND "period" = ?`);
  for (const per of result.periods) {
    if (per.rows.length % chunk.chains !== 0) throw new Error(`batch: chunk ${chunkIndex} returned a ragged statistics block`);
    insert.run(batchId, per.period, chunkIndex, chunk.firstChain, chunk.chains, toBuffer(per.rows));
    const row = readCounts.get(batchId, per.period) as { counts: Buffer; networks: number; tieTotal: number } | undefined;
    if (!row) throw new Error(`batch: no tie-count row for batch ${batchId}, period ${per.period}`);
    const counts = int32FromBlob(row.counts);
    if (counts.length !== per.counts.length) throw new Error(`batch: tie counts of chunk ${chunkIndex} have the wrong size`);
    for (let k = 0; k < counts.length; k++) counts[k] += per.counts[k];
    writeCounts.run(toBuffer(counts), Number(row.networks) + chunk.chains, Number(row.tieTotal) + per.tieTotal, batchId, per.period);
  }
}

registerJobKind<BatchJobPayload, BatchChunk, BatchContext, BatchChunkResult>(BATCH_JOB_KIND, {
  planChunks: planBatchChunks,
  workerModule: join(__dirname, 'worker.ts'),
  loadContext: (job, dataSource) => loadBatchContext(dataSource, job.payload.batchId),
  storeChunk: (db, job, chunkIndex, chunk, result) => storeBatchChunk(db, job.payload.batchId, chunkIndex, chunk, result),
  // Notifications (server/notify): the team hears when a batch finished or failed.
  // and its goodness of fit is computed once, in a worker, right after (gofStore.ts).
  finish: (db, job) => {
    recordBatchEnded(db, job.payload.batchId, 'done');
    batchDone(db, job.payload.batchId);
  },
  onEnd(db, job, state, reason) {
    recordBatchEnded(db, job.payload.batchId, state, reason);
    // A cancelled or failed batch keeps no partial results (its GOF would describe fewer chains than asked).
    db.prepare(`DELETE FROM "batch_results" WHERE "batchId" = ?`).run(job.payload.batchId);
    db.prepare(`UPDATE "batch_tie_counts" SET "networks" = 0, "tieTotal" = 0, "counts" = zeroblob(length("counts")) WHERE "batchId" = ?`).run(
      job.payload.batchId,
    );
  },
});
