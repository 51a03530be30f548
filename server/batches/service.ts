/**
 * Batches on the server: making one (checked against the study's data, stored with its job in one
 * transaction), reading them with live progress, and the goodness-of-fit views computed from the
 * stored rows (envelopes, Mahalanobis test, consensus networks, CSV).
 */
import { randomInt } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { AuxStatisticId } from '../../shared/auxStatistics';
import type {
  BatchDetail,
  BatchModel,
  BatchState,
  BatchSummary,
  ParsedCreateBatchBody,
  StatisticLayout,
} from '../../shared/batches';
import { effectInfo, type EffectId } from '../../shared/effects';
import { loadStudyData, type LoadedStudyData } from '../data/store';
import { badRequest, conflict, notFound } from '../errors';
import { buildEffects } from '../engine/effects';
import { NetworkState } from '../engine/state';
import { auxStatistic } from '../engine/statistics';
import { createJobRow, inSyncTransaction, jobQueueFor, parseSqlDate, sqlNow, syncDb, type JobStatus } from '../jobs';
import { BATCH_JOB_KIND, type BatchJobPayload } from './jobKind';
import { auxOptionsOf, buildLayout, resolveMaxima, type ResolvedMaxima } from './layout';
import { fitModel, FitNotUsable } from './fitModel';
import { periodCovariates, periodNetworks } from '../data/periods';

/** Above this many expected ministeps in one period of one chain, a batch is refused as a runaway. */
export const MAX_EXPECTED_MINISTEPS = 2_000_000;

interface BatchRow {
  id: number;
  studyId: number;
  jobId: number | null;
  fitId: number | null;
  createdById: number | null;
  label: string;
  model: string;
  periods: string;
  chains: number;
  seed: number;
  statistics: string;
  maxima: string;
  layout: string;
  observed: string;
  actorCount: number;
  createdAt: string;
  creatorName?: string | null;
}

// ---------------------------------------------------------------- creating

export interface CreateBatchInput {
  studyId: number;
  userId: number;
  body: ParsedCreateBatchBody;
}

function checkRateCount(model: BatchModel, data: LoadedStudyData): void {
  const M = data.waves.length;
  if (model.rates.length !== M - 1) {
    throw badRequest(`The study has ${M} waves, so the model needs ${M - 1} rate${M - 1 === 1 ? '' : 's'} (one per period); ${model.rates.length} ${model.rates.length === 1 ? 'was' : 'were'} given.`);
  }
}

function checkModelAgainstData(model: BatchModel, data: LoadedStudyData, periods: number[]): void {
  checkRateCount(model, data);
  const covs = periodCovariates(data);
  const n = data.actors.length;
  for (const p of periods) {
    try {
      buildEffects(
        model.effects.map((e) => (e.covariate ? { id: e.id, covariate: e.covariate } : { id: e.id })),
        covs[p - 1].values,
        covs[p - 1].centring,
      );
    } catch (error) {
      throw badRequest(`The model does not fit this study's data: ${(error as Error).message.replace(/^effects: /, '')}`);
    }
    const rate = model.rates[p - 1] ?? 0;
    const expected = n * rate;
    if (expected > MAX_EXPECTED_MINISTEPS) {
      throw badRequest(`The rate of period ${p} (${rate}) means about ${Math.round(expected)} ministeps per chain for ${n} actors, more than ${MAX_EXPECTED_MINISTEPS}; check the rates.`);
    }
  }
}

function observedVectors(data: LoadedStudyData, periods: number[], statistics: AuxStatisticId[], maxima: ResolvedMaxima) {
  const networks = periodNetworks(data);
  const n = data.actors.length;
  const observed: Record<number, Record<string, number[]>> = {};
  for (const p of periods) {
    const end = NetworkState.fromAdjacency(n, networks[p - 1].end);
    observed[p] = {};
    for (const id of statistics) observed[p][id] = Array.from(auxStatistic(id, end, auxOptionsOf(maxima)).values);
  }
  return observed;
}

/** Makes a batch and queues its job. Refusals throw ApiError and store nothing. */
export async function createBatch(dataSource: DataSource, input: CreateBatchInput): Promise<number> {
  const { studyId, userId, body } = input;
  let data: LoadedStudyData;
  try {
    data = await loadStudyData(dataSource, studyId);
  } catch {
    throw badRequest('This study has no data yet: upload at least two waves before simulating.');
  }
  const M = data.waves.length;
  let model: BatchModel;
  if (body.fitId !== undefined) {
    let resolved: BatchModel | null;
    try {
      resolved = fitModel(dataSource, studyId, body.fitId, M - 1);
    } catch (error) {
      if (error instanceof FitNotUsable) throw conflict('batch_not_ready', error.message);
      throw error;
    }
    if (!resolved) throw notFound('Fit not found in this study.');
    model = resolved;
  } else {
    const m = body.model!;
    model = {
      source: 'hand-entered',
      fitId: null,
      rates: m.rates,
      effects: m.effects.map((e) => ({
        id: e.id,
        ...(e.covariate ? { covariate: e.covariate } : {}),
        label: effectInfo(e.id as EffectId).label + (e.covariate ? ` (${e.covariate})` : ''),
        value: e.value,
      })),
    };
  }
  checkRateCount(model, data);
  const covered = model.rates.map((r, k) => (r === null ? 0 : k + 1)).filter((p) => p > 0);
  const periods = body.periods ? [...new Set(body.periods)].sort((a, b) => a - b) : covered;
  const badPeriod = periods.find((p) => p > M - 1);
  if (badPeriod !== undefined) {
    throw badRequest(`The study has ${M - 1} period${M - 1 === 1 ? '' : 's'} (${M} waves); there is no period ${badPeriod}.`);
  }
  const uncovered = periods.find((p) => model.rates[p - 1] == null);
  if (uncovered !== undefined) {
    throw badRequest(`Fit ${model.fitId} does not cover period ${uncovered}; it covers period${covered.length === 1 ? '' : 's'} ${covered.join(', ')}.`);
  }
  checkModelAgainstData(model, data, periods);
  const n = data.actors.length;
  const statistics = body.statistics as AuxStatisticId[];
  const maxima = resolveMaxima(n, body.maxima ?? {});
  if (maxima.degree > n - 1 && body.maxima?.degree !== undefined) {
    throw badRequest(`The largest degree shown can be at most ${n - 1} (the study has ${n} actors).`);
  }
  if (maxima.distance > Math.max(1, n - 1) && body.maxima?.distance !== undefined) {
    throw badRequest(`The largest distance shown can be at most ${Math.max(1, n - 1)} (the study has ${n} actors).`);
  }
  const layout = buildLayout(statistics, maxima);
  const observed = observedVectors(data, periods, statistics, maxima);
  const seed = body.seed ?? randomInt(0, 2 ** 47);
  const chains = body.chains;
  const db = syncDb(dataSource);
  const batchId = await inSyncTransaction(db, (tx) => {
    const count = (tx.prepare(`SELECT COUNT(*) AS n FROM "batches" WHERE "studyId" = ?`).get(studyId) as { n: number }).n;
    const label =
      body.label && body.label.length > 0
        ? body.label
        : `Batch ${count + 1}: ${chains} chains, ${model.source === 'fit' ? `fit ${model.fitId}` : 'hand-entered model'}`;
    const result = tx
      .prepare(
        `INSERT INTO "batches" ("studyId", "jobId", "fitId", "createdById", "label", "model", "periods", "chains", "seed", "statistics", "maxima", "layout", "observed", "actorCount", "createdAt")
         VALUES (?, NULL, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      )
      .run(
        studyId,
        model.fitId,
        userId,
        label,
        JSON.stringify(model),
        JSON.stringify(periods),
        chains,
        seed,
        JSON.stringify(statistics),
        JSON.stringify(maxima),
        JSON.stringify(layout),
        JSON.stringify(observed),
        n,
        sqlNow(),
      );
    const id = Number(result.lastInsertRowid);
    const zero = Buffer.alloc(n * n * 4);
    const tie = tx.prepare(`INSERT INTO "batch_tie_counts" ("batchId", "period", "actors", "networks", "tieTotal", "counts") VALUES (?, ?, ?, 0, 0, ?)`);
    for (const p of periods) tie.run(id, p, n, zero);
    const payload: BatchJobPayload = { batchId: id, chains, periods: periods.length };
    const jobId = createJobRow(tx, BATCH_JOB_KIND, payload);
    tx.prepare(`UPDATE "batches" SET "jobId" = ? WHERE "id" = ?`).run(jobId, id);
    return id;
  });
  const queue = jobQueueFor(dataSource);
  if (!queue.isRunning) await queue.start();
  queue.wake();
  return batchId;
}

// ---------------------------------------------------------------- reading

function readRows(dataSource: DataSource, where: string, params: unknown[]): BatchRow[] {
  return syncDb(dataSource)
    .prepare(
      `SELECT b.*, u."name" AS "creatorName" FROM "batches" b LEFT JOIN "users" u ON u."id" = b."createdById" WHERE ${where} ORDER BY b."id" DESC`,
    )
    .all(...params) as BatchRow[];
}

function stateOf(job: JobStatus | undefined): BatchState {
  return job ? job.state : 'failed';
}

function summaryOf(row: BatchRow, job: JobStatus | undefined): BatchSummary {
  const periods = JSON.parse(row.periods) as number[];
  const model = JSON.parse(row.model) as BatchModel;
  const total = row.chains * periods.length;
  return {
    id: row.id,
    studyId: row.studyId,
    label: row.label,
    state: stateOf(job),
    source: model.source,
    fitId: row.fitId,
    periods,
    chains: row.chains,
    seed: Number(row.seed),
    statistics: JSON.parse(row.statistics) as AuxStatisticId[],
    maxima: JSON.parse(row.maxima) as ResolvedMaxima,
    chainsDone: job ? job.progressDone : 0,
    chainsTotal: total,
    secondsLeft: job?.secondsLeft ?? null,
    error: job ? job.error : 'The job of this batch is gone.',
    createdBy: row.creatorName ?? null,
    createdAt: parseSqlDate(row.createdAt)!.toISOString(),
    startedAt: job?.startedAt?.toISOString() ?? null,
    finishedAt: job?.finishedAt?.toISOString() ?? null,
  };
}

export function listBatches(dataSource: DataSource, studyId: number): BatchSummary[] {
  const rows = readRows(dataSource, `b."studyId" = ?`, [studyId]);
  const jobs = jobQueueFor(dataSource).statuses(rows.map((r) => r.jobId).filter((id): id is number => id !== null));
  return rows.map((r) => summaryOf(r, r.jobId !== null ? jobs.get(r.jobId) : undefined));
}

export interface LoadedBatch {
  row: BatchRow;
  summary: BatchSummary;
  model: BatchModel;
  layout: StatisticLayout[];
  observed: Record<string, Record<string, number[]>>;
  jobId: number | null;
}

export function getBatch(dataSource: DataSource, studyId: number, batchId: number): LoadedBatch | null {
  const [row] = readRows(dataSource, `b."studyId" = ? AND b."id" = ?`, [studyId, batchId]);
  if (!row) return null;
  const job = row.jobId !== null ? (jobQueueFor(dataSource).status(row.jobId) ?? undefined) : undefined;
  return {
    row,
    summary: summaryOf(row, job),
    model: JSON.parse(row.model) as BatchModel,
    layout: JSON.parse(row.layout) as StatisticLayout[],
    observed: JSON.parse(row.observed) as Record<string, Record<string, number[]>>,
    jobId: row.jobId,
  };
}

export function batchDetail(dataSource: DataSource, batch: LoadedBatch): BatchDetail {
  const log = batch.jobId !== null ? (jobQueueFor(dataSource).status(batch.jobId)?.log ?? '') : '';
  return { ...batch.summary, model: batch.model, layout: batch.layout, actors: batch.row.actorCount, log };
}

/** Cancels a queued or running batch; a batch that has ended is left as it is. */
export async function cancelBatch(dataSource: DataSource, batch: LoadedBatch): Promise<void> {
  if (batch.jobId === null) return;
  await jobQueueFor(dataSource).cancel(batch.jobId, 'cancelled by a user');
}

// ---------------------------------------------------------------- statistics of a finished batch
