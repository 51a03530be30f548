/**
 * Fits of a model: starting one (a job on the queue, or a hand-entered "fixed" fit stored at once),
 * reading them with live progress, and cancelling. Refusals throw ApiError and store nothing.
 */
import { randomInt } from 'node:crypto';
import type { DataSource } from 'typeorm';
import {
  parameterLabel,
  type FitDetail,
  type FitResults,
  type FitSummary,
  type ParsedStartFitBody,
} from '../../shared/models';
import { badRequest, conflict, notFound } from '../errors';
import { createJobRow, inSyncTransaction, jobQueueFor, sqlNow, syncDb, type JobStatus } from '../jobs';
import type { FitJobPayload, StoredFitPlan } from './context';
import { FIT_JOB_KIND, plainReason } from './jobKind';
import { checkSpecAgainstData, effectKey, rateKey, sortedRates, type StoredSpec } from './modelData';
import { decodeProgress, fitWorkPlan } from './progress';
import { resultsFromValues } from './results';
import { fitRows, fitState, iso, jobStatuses, refuseOnErrors, studyData, type FitRowDb, type ModelRow } from './rows';

export function fitSummary(row: FitRowDb, job: JobStatus | undefined): FitSummary {
  const results = row.results ? (JSON.parse(row.results) as FitResults) : null;
  const state = fitState(row, job);
  let error = row.error;
  if (state === 'failed' && !error) error = job?.error ? plainReason(job.error) : 'The fit failed.';
  return {
    id: row.id,
    modelId: row.modelId,
    studyId: row.studyId,
    mode: row.mode as 'estimate' | 'fixed',
    state,
    seed: Number(row.seed),
    phase3Runs: row.phase3Runs,
    startFrom: row.startFromId,
    converged: row.mode === 'estimate' && results ? results.converged : null,
    tauMax: results?.tauMax ?? null,
    error,
    createdBy: row.creatorName ?? null,
    createdAt: iso(row.createdAt)!,
    startedAt: job?.startedAt?.toISOString() ?? (row.mode === 'fixed' ? iso(row.createdAt) : null),
    finishedAt: iso(row.finishedAt),
  };
}

export function getFitRow(dataSource: DataSource, studyId: number, modelId: number, fitId: number): FitRowDb | null {
  return fitRows(dataSource, `f."studyId" = ? AND f."modelId" = ? AND f."id" = ?`, [studyId, modelId, fitId])[0] ?? null;
}

export function listFits(dataSource: DataSource, studyId: number, modelId: number): FitSummary[] {
  const rows = fitRows(dataSource, `f."studyId" = ? AND f."modelId" = ?`, [studyId, modelId]);
  const jobs = jobStatuses(dataSource, rows);
  return rows.map((r) => fitSummary(r, r.jobId !== null ? jobs.get(r.jobId) : undefined));
}

export function fitDetail(dataSource: DataSource, row: FitRowDb): FitDetail {
  const job = row.jobId !== null ? (jobQueueFor(dataSource).status(row.jobId) ?? undefined) : undefined;
  const summary = fitSummary(row, job);
  let progress = null;
  if (row.mode === 'estimate' && job) {
    const payload = JSON.parse(
      (syncDb(dataSource).prepare(`SELECT "payload" FROM "jobs" WHERE "id" = ?`).get(row.jobId) as { payload: string }).payload,
    ) as FitJobPayload;
    const plan = fitWorkPlan(payload.p, payload.phase3Runs, payload.skipPhase1);
    progress = summary.state === 'done' ? { phase: 3 as const, subphase: 0, iteration: payload.phase3Runs, planned: payload.phase3Runs, fraction: 1 } : decodeProgress(plan, job.progressDone);
  }
  const log = (job?.log ?? '')
    .split('\n')
    .filter((l) => l.trim().length > 0)
    .map((l) => l.replace(/^(\S+) chunk \d+: /, '$1 '));
  if (row.mode === 'fixed') log.push(`${iso(row.createdAt)} Values entered by hand; nothing was estimated.`);
  return {
    ...summary,
    progress,
    log,
    results: row.results ? (JSON.parse(row.results) as FitResults) : null,
  };
}

/** Every parameter key of a spec, in model order. */
export function parameterKeys(spec: StoredSpec): string[] {
  return [...sortedRates(spec).map((r) => rateKey(r.period)), ...spec.effects.map(effectKey)];
}

export async function startFit(
  dataSource: DataSource,
  model: ModelRow,
  userId: number,
  body: ParsedStartFitBody,
): Promise<number> {
  const spec = JSON.parse(model.spec) as StoredSpec;
  const data = await studyData(dataSource, model.studyId);
  const seed = body.seed ?? randomInt(0, 2 ** 47);
  const keys = parameterKeys(spec);

  if (body.mode === 'fixed') {
    const known = new Set(keys);
    const unknown = Object.keys(body.values ?? {}).filter((k) => !known.has(k));
    if (unknown.length) {
      throw badRequest(`This model has no parameter ${unknown.map((k) => `"${k}"`).join(', ')} (it has ${keys.join(', ')}).`, {
        fields: { values: [`Unknown parameter ${unknown.join(', ')}.`] },
      }, 'validation_failed');
    }
    const values: Record<string, number> = {};
    const missing: string[] = [];
    const fields: Record<string, string[]> = {};
    sortedRates(spec).forEach((r) => {
      const key = rateKey(r.period);
      const v = body.values?.[key] ?? r.value;
      if (v === undefined) missing.push(parameterLabel(key));
      else if (!(v > 0)) (fields[`values.${key}`] ??= []).push('A rate must be greater than 0.');
      else values[key] = v;
    });
    spec.effects.forEach((e) => {
      const key = effectKey(e);
      const v = body.values?.[key] ?? e.value;
      if (v === undefined) missing.push(parameterLabel(key));
      else values[key] = v;
    });
    if (missing.length) fields.values = [`Enter a value for ${missing.join(', ')}.`];
    if (Object.keys(fields).length) {
      throw badRequest(`A fit with hand-entered values needs a value for every parameter: ${Object.values(fields).flat().join(' ')}`, { fields }, 'validation_failed');
    }
    // The data must still suit the model (covariates present and of the right kind).
    refuseOnErrors(checkSpecAgainstData(data, spec).filter((n) => n.code !== 'zero_change' && n.code !== 'at_bound'));
    const results = resultsFromValues(spec, values);
    return inSyncTransaction(syncDb(dataSource), (db) => {
      const now = sqlNow();
      const r = db
        .prepare(
          `INSERT INTO "fits" ("studyId", "modelId", "jobId", "mode", "state", "seed", "phase3Runs", "startFromId", "spec", "plan", "results", "error", "createdById", "createdAt", "finishedAt")
           VALUES (?, ?, NULL, 'fixed', 'done', ?, 0, NULL, ?, ?, ?, NULL, ?, ?, ?)`,
        )
        .run(model.studyId, model.id, seed, JSON.stringify(spec), JSON.stringify({ startValues: values, initialDerivative: null }), JSON.stringify(results), userId, now, now);
      return Number(r.lastInsertRowid);
    });
  }

  // Estimation.
  if (body.values !== undefined) {
    throw badRequest('Values are for hand-entered fits (mode "fixed"); an estimation starts from the model\'s starting values or from startFrom.', {
      fields: { values: ['Only with mode "fixed".'] },
    }, 'validation_failed');
  }
  const p = spec.rates.filter((r) => r.estimate).length + spec.effects.filter((e) => e.estimate).length;
  if (p === 0) {
    throw badRequest('Every parameter of this model is fixed, so there is nothing to estimate. Mark at least one as estimated, or store the values as a hand-entered fit (mode "fixed").', { fields: { mode: ['Nothing to estimate.'] } }, 'validation_failed');
  }
  refuseOnErrors(checkSpecAgainstData(data, spec));
  const plan: StoredFitPlan = { startValues: {}, initialDerivative: null };
  if (body.startFrom !== undefined) {
    const earlier = getFitRow(dataSource, model.studyId, model.id, body.startFrom);
    if (!earlier) throw notFound('The fit to start from was not found among this model\'s fits.');
    if (!earlier.results) {
      throw badRequest('The fit to start from has no results (it is not done); wait for it or choose another.', {
        fields: { startFrom: ['That fit has no results.'] },
      }, 'validation_failed');
    }
    const results = JSON.parse(earlier.results) as FitResults;
    for (const q of results.parameters) plan.startValues[q.key] = q.value;
    const estimatedNow = parameterKeys(spec).filter((k) => {
      if (k.startsWith('rate:')) return spec.rates.find((r) => rateKey(r.period) === k)!.estimate;
      return spec.effects.find((e) => effectKey(e) === k)!.estimate;
    });
    const derivative = readDerivative(earlier);
    if (
      earlier.mode === 'estimate' &&
      derivative &&
      estimatedNow.length === results.estimatedKeys.length &&
      estimatedNow.every((k, i) => results.estimatedKeys[i] === k)
    ) {
      plan.initialDerivative = derivative;
    }
  }
  const payload: FitJobPayload = { fitId: 0, p, phase3Runs: body.phase3Runs, skipPhase1: plan.initialDerivative !== null };
  const fitId = await inSyncTransaction(syncDb(dataSource), (db) => {
    const now = sqlNow();
    const r = db
      .prepare(
        `INSERT INTO "fits" ("studyId", "modelId", "jobId", "mode", "state", "seed", "phase3Runs", "startFromId", "spec", "plan", "results", "error", "createdById", "createdAt", "finishedAt")
         VALUES (?, ?, NULL, 'estimate', 'queued', ?, ?, ?, ?, ?, NULL, NULL, ?, ?, NULL)`,
      )
      .run(model.studyId, model.id, seed, body.phase3Runs, body.startFrom ?? null, JSON.stringify(spec), JSON.stringify(plan), userId, now);
    const id = Number(r.lastInsertRowid);
    const jobId = createJobRow(db, FIT_JOB_KIND, { ...payload, fitId: id });
    db.prepare(`UPDATE "fits" SET "jobId" = ? WHERE "id" = ?`).run(jobId, id);
    return id;
  });
  const queue = jobQueueFor(dataSource);
  if (!queue.isRunning) await queue.start();
  queue.wake();
  return fitId;
}

/** The Phase 3 derivative matrix an estimation stored with its results (for continuing). */
export function readDerivative(row: FitRowDb): number[][] | null {
  if (!row.results) return null;
  const d = (JSON.parse(row.results) as FitResults).derivative;
  if (!Array.isArray(d) || d.some((r) => !Array.isArray(r) || r.some((v) => typeof v !== 'number' || !Number.isFinite(v)))) return null;
  return d;
}

export async function cancelFit(dataSource: DataSource, row: FitRowDb): Promise<void> {
  if (row.mode !== 'estimate' || row.jobId === null) {
    throw conflict('fit_not_running', 'A fit with hand-entered values has nothing to cancel.');
  }
  const status = jobQueueFor(dataSource).status(row.jobId);
  const state = fitState(row, status ?? undefined);
  if (state === 'done' || state === 'failed' || state === 'cancelled') {
    throw conflict('fit_not_running', `This fit has already ${state === 'done' ? 'finished' : state === 'failed' ? 'failed' : 'been cancelled'}; there is nothing to cancel.`);
  }
  await jobQueueFor(dataSource).cancel(row.jobId, 'cancelled by a user');
}
