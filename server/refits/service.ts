/**
 * Re-fit studies on the server: making one from 1-4 finished fits (checked, stored with its job in one
 * transaction), reading them with live progress, cancelling, and the summaries and CSV of the stored
 * re-fits (./summary.ts).
 */
import { randomInt } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { FitResults } from '../../shared/models';
import { parameterLabel } from '../../shared/models';
import type { ParsedCreateRefitBody, RefitModelInfo, RefitResults, RefitState, RefitSummary } from '../../shared/refits';
import { ApiError, badRequest, conflict, notFound } from '../errors';
import { createJobRow, inSyncTransaction, jobQueueFor, parseSqlDate, sqlNow, syncDb, type JobStatus } from '../jobs';
import { effectKey, rateKey, sortedRates, type StoredSpec } from '../models/modelData';
import { studyData } from '../models/rows';
import type { RefitJobPayload, StoredRefitModel } from './context';
import { REFIT_JOB_KIND, planRefitChunks } from './jobKind';
import { summariseRefits, type RefitRow } from './summary';

interface RefitRowDb {
  id: number;
  studyId: number;
  jobId: number | null;
  createdById: number | null;
  label: string;
  models: string;
  replications: number;
  cross: number;
  seed: number;
  phase3Runs: number;
  createdAt: string;
  creatorName?: string | null;
}

interface FitForRefit {
  id: number;
  modelId: number;
  state: string;
  mode: string;
  spec: string;
  results: string | null;
  modelName: string;
}

/** A chosen fit as the study stores it; throws ApiError with a plain reason when it cannot be used. */
function storedModel(fit: FitForRefit): StoredRefitModel {
  if (!fit.results) {
    throw conflict('fit_not_ready', `Fit ${fit.id} (${fit.modelName}) has no results (it is ${fit.state}); a re-fit study starts from finished fits.`);
  }
  const spec = JSON.parse(fit.spec) as StoredSpec;
  const results = JSON.parse(fit.results) as FitResults;
  const keys = [...sortedRates(spec).map((r) => rateKey(r.period)), ...spec.effects.map((e) => effectKey(e))];
  const estimated = [...sortedRates(spec).map((r) => r.estimate), ...spec.effects.map((e) => e.estimate)];
  const byKey = new Map(results.parameters.map((p) => [p.key, p.value]));
  const values = keys.map((k) => byKey.get(k));
  if (values.some((v) => v === undefined || !Number.isFinite(v))) {
    throw conflict('fit_not_ready', `Fit ${fit.id} (${fit.modelName}) lacks a value for some parameter; it cannot be simulated.`);
  }
  if (!estimated.some(Boolean)) {
    throw badRequest(`Every parameter of ${fit.modelName} is fixed, so a re-fit would estimate nothing.`);
  }
  const estimatedKeys = keys.filter((_, k) => estimated[k]);
  const sameOrder = results.estimatedKeys.length === estimatedKeys.length && results.estimatedKeys.every((k, i) => k === estimatedKeys[i]);
  const derivative = sameOrder && Array.isArray(results.derivative) && results.derivative.every((r) => r.every(Number.isFinite)) ? results.derivative : null;
  const info: RefitModelInfo = {
    fitId: fit.id,
    modelId: fit.modelId,
    name: `${fit.modelName} (fit ${fit.id})`,
    keys,
    labels: keys.map(parameterLabel),
    values: values as number[],
    estimated,
    converged: fit.mode === 'estimate' && results.converged,
    handEntered: fit.mode !== 'estimate',
  };
  return { info, spec, derivative };
}

export interface CreateRefitInput {
  studyId: number;
  userId: number;
  body: ParsedCreateRefitBody;
}

/** Makes a re-fit study and queues its job. Refusals throw ApiError and store nothing. */
export async function createRefit(dataSource: DataSource, input: CreateRefitInput): Promise<number> {
  const { studyId, userId, body } = input;
  const data = await studyData(dataSource, studyId);
  const db = syncDb(dataSource);
  const models = body.fitIds.map((fitId) => {
    const fit = db
      .prepare(
        `SELECT f."id", f."modelId", f."state", f."mode", f."spec", f."results", m."name" AS "modelName" FROM "fits" f JOIN "model_specs" m ON m."id" = f."modelId" WHERE f."id" = ? AND f."studyId" = ?`,
      )
      .get(fitId, studyId) as FitForRefit | undefined;
    if (!fit) throw notFound(`Fit ${fitId} not found in this study.`);
    return storedModel(fit);
  });
  const periodsOf = (m: StoredRefitModel) => sortedRates(m.spec).map((r) => r.period).join(', ');
  const first = periodsOf(models[0]);
  const other = models.find((m) => periodsOf(m) !== first);
  if (other) {
    throw badRequest(`The chosen fits must cover the same periods: ${models[0].info.name} covers period ${first}, ${other.info.name} covers period ${periodsOf(other)}.`);
  }
  const M = data.waves.length;
  const beyond = sortedRates(models[0].spec).find((r) => r.period > M - 1);
  if (beyond) throw badRequest(`The study has ${M - 1} period${M - 1 === 1 ? '' : 's'}; there is no period ${beyond.period} any more.`);
  const seed = body.seed ?? randomInt(0, 2 ** 47);
  const payload: Omit<RefitJobPayload, 'refitId'> = { models: models.length, replications: body.replications, cross: body.cross && models.length > 1 };
  const refitId = await inSyncTransaction(db, (tx) => {
    const count = (tx.prepare(`SELECT COUNT(*) AS n FROM "refits" WHERE "studyId" = ?`).get(studyId) as { n: number }).n;
    const label =
      body.label && body.label.length > 0 ? body.label : `Re-fit study ${count + 1}: ${body.replications} panels from fit${models.length > 1 ? 's' : ''} ${body.fitIds.join(', ')}`;
    const result = tx
      .prepare(
        `INSERT INTO "refits" ("studyId", "jobId", "createdById", "label", "models", "replications", "cross", "seed", "phase3Runs", "createdAt") VALUES (?, NULL, ?, ?, ?, ?, ?, ?, ?, ?)`,
      )
      .run(studyId, userId, label, JSON.stringify(models), body.replications, payload.cross ? 1 : 0, seed, body.phase3Runs, sqlNow());
    const id = Number(result.lastInsertRowid);
    const jobId = createJobRow(tx, REFIT_JOB_KIND, { refitId: id, ...payload });
    tx.prepare(`UPDATE "refits" SET "jobId" = ? WHERE "id" = ?`).run(jobId, id);
    return id;
  });
  const queue = jobQueueFor(dataSource);
  if (!queue.isRunning) await queue.start();
  queue.wake();
  return refitId;
}

// ---------------------------------------------------------------- reading

function readRows(dataSource: DataSource, where: string, params: unknown[]): RefitRowDb[] {
  return syncDb(dataSource)
    .prepare(`SELECT r.*, u."name" AS "creatorName" FROM "refits" r LEFT JOIN "users" u ON u."id" = r."createdById" WHERE ${where} ORDER BY r."id" DESC`)
    .all(...params) as RefitRowDb[];
}

function summaryOf(row: RefitRowDb, job: JobStatus | undefined): RefitSummary {
  const models = JSON.parse(row.models) as StoredRefitModel[];
  const cross = Boolean(row.cross);
  const total = planRefitChunks({ refitId: row.id, models: models.length, replications: row.replications, cross }).length;
  return {
    id: row.id,
    studyId: row.studyId,
    label: row.label,
    state: (job ? job.state : 'failed') as RefitState,
    models: models.map((m) => m.info),
    replications: row.replications,
    cross,
    seed: Number(row.seed),
    phase3Runs: row.phase3Runs,
    refitsDone: job ? Math.min(total, Math.floor(job.progressDone)) : 0,
    refitsTotal: total,
    secondsLeft: job?.secondsLeft ?? null,
    error: job ? job.error : 'The job of this re-fit study is gone.',
    createdBy: row.creatorName ?? null,
    createdAt: parseSqlDate(row.createdAt)!.toISOString(),
    finishedAt: job?.finishedAt?.toISOString() ?? null,
    log: job?.log ?? '',
  };
}

export function listRefits(dataSource: DataSource, studyId: number): RefitSummary[] {
  const rows = readRows(dataSource, `r."studyId" = ?`, [studyId]);
  const jobs = jobQueueFor(dataSource).statuses(rows.map((r) => r.jobId).filter((id): id is number => id !== null));
  return rows.map((r) => ({ ...summaryOf(r, r.jobId !== null ? jobs.get(r.jobId) : undefined), log: '' }));
}

export interface LoadedRefit {
  row: RefitRowDb;
  summary: RefitSummary;
  models: StoredRefitModel[];
}

export function getRefit(dataSource: DataSource, studyId: number, refitId: number): LoadedRefit | null {
  const [row] = readRows(dataSource, `r."studyId" = ? AND r."id" = ?`, [studyId, refitId]);
  if (!row) return null;
  const job = row.jobId !== null ? (jobQueueFor(dataSource).status(row.jobId) ?? undefined) : undefined;
  return { row, summary: summaryOf(row, job), models: JSON.parse(row.models) as StoredRefitModel[] };
}

export async function cancelRefit(dataSource: DataSource, refit: LoadedRefit): Promise<void> {
  const state = refit.summary.state;
  if (state === 'done' || state === 'failed' || state === 'cancelled') {
    throw conflict('refit_not_running', `This re-fit study has already ${state === 'done' ? 'finished' : state === 'failed' ? 'failed' : 'been cancelled'}; there is nothing to cancel.`);
  }
  if (refit.row.jobId !== null) await jobQueueFor(dataSource).cancel(refit.row.jobId, 'cancelled by a user');
}

function float64(blob: Buffer): Float64Array {
  const out = new Float64Array(blob.byteLength / 8);
  new Uint8Array(out.buffer).set(blob);
  return out;
}

/** The stored re-fits of a study, in chunk order. */
export function storedRefitRows(dataSource: DataSource, refitId: number): RefitRow[] {
  const rows = syncDb(dataSource)
    .prepare(`SELECT "source", "target", "replication", "finished", "converged", "estimates", "ses", "error" FROM "refit_results" WHERE "refitId" = ? ORDER BY "chunkIndex"`)
    .all(refitId) as { source: number; target: number; replication: number; finished: number; converged: number; estimates: Buffer; ses: Buffer; error: string | null }[];
  return rows.map((r) => ({
    source: r.source,
    target: r.target,
    replication: r.replication,
    finished: r.finished === 1,
    converged: r.converged === 1,
    estimates: float64(r.estimates),
    ses: float64(r.ses),
    error: r.error,
  }));
}

/** The summaries; refused (409) while the study runs, or when it ended without any re-fit. */
export function refitResults(dataSource: DataSource, refit: LoadedRefit, include: 'converged' | 'all'): RefitResults {
  const state = refit.summary.state;
  if (state === 'queued' || state === 'running') {
    throw new ApiError(409, 'refit_not_ready', `This re-fit study is still ${state === 'queued' ? 'waiting to run' : `running (${refit.summary.refitsDone} of ${refit.summary.refitsTotal} re-fits)`}; its results are shown once it is done.`);
  }
  const rows = storedRefitRows(dataSource, refit.row.id);
  if (rows.length === 0) throw new ApiError(409, 'refit_not_ready', `This re-fit study ${state === 'failed' ? 'failed' : 'was cancelled'} before any re-fit finished.`);
  const groups = summariseRefits(refit.models, rows, include, refit.summary.cross);
  if (state !== 'done') {
    const caution = `This study ${state === 'failed' ? 'failed' : 'was cancelled'} after ${rows.length} of ${refit.summary.refitsTotal} re-fits; the figures describe those alone.`;
    for (const g of groups) g.cautions.unshift(caution);
  }
  return { refit: refit.summary, include, groups };
}
