/**
 * Models and fits: storing and checking model specifications, starting fits (a job on the queue, or a
 * hand-entered "fixed" fit stored at once), reading them with live progress, and cancelling.
 * Refusals throw ApiError (../errors.ts; the error handler answers with it) and store nothing.
 */
import { randomInt } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { EffectId } from '../../shared/effects';
import {
  modelSpecBodySchema,
  parameterLabel,
  type FitDetail,
  type FitResults,
  type FitState,
  type FitSummary,
  type ModelDetail,
  type ModelNote,
  type ModelSummary,
  type ParsedModelSpecBody,
  type ParsedStartFitBody,
} from '../../shared/models';
import { loadStudyData, type LoadedStudyData } from '../data/store';
import { badRequest, conflict, notFound } from '../errors';
import { createJobRow, inSyncTransaction, jobQueueFor, parseSqlDate, sqlNow, syncDb, type JobStatus } from '../jobs';
import type { FitJobPayload, StoredFitPlan } from './context';
import { FIT_JOB_KIND, plainReason } from './jobKind';
import { checkSpecAgainstData, effectKey, rateKey, sortedRates, type StoredSpec } from './modelData';
import { decodeProgress, fitWorkPlan } from './progress';
import { resultsFromValues } from './results';

interface ModelRow {
  id: number;
  studyId: number;
  name: string;
  description: string;
  spec: string;
  createdById: number | null;
  createdAt: string;
  updatedAt: string;
  creatorName?: string | null;
}

interface FitRowDb {
  id: number;
  studyId: number;
  modelId: number;
  jobId: number | null;
  mode: string;
  state: string;
  seed: number;
  phase3Runs: number;
  startFromId: number | null;
  spec: string;
  plan: string;
  results: string | null;
  error: string | null;
  createdById: number | null;
  createdAt: string;
  finishedAt: string | null;
  creatorName?: string | null;
}

const iso = (value: string | null | undefined): string | null => parseSqlDate(value)?.toISOString() ?? null;

async function studyData(dataSource: DataSource, studyId: number): Promise<LoadedStudyData> {
  try {
    return await loadStudyData(dataSource, studyId);
  } catch {
    throw badRequest('This study has no data yet: upload at least two waves before making a model.');
  }
}

/** Turns error notes into a 400 validation_failed with messages per field. */
function refuseOnErrors(notes: ModelNote[]): void {
  const errors = notes.filter((n) => n.severity === 'error');
  if (errors.length === 0) return;
  const fields: Record<string, string[]> = {};
  for (const e of errors) (fields[e.path] ??= []).push(e.message);
  throw badRequest(`The model does not suit this study's data: ${errors.map((e) => e.message).join(' ')}`, { fields, notes }, 'validation_failed');
}

function specOf(body: { rates: StoredSpec['rates']; effects: StoredSpec['effects'] }): StoredSpec {
  return {
    rates: body.rates.map((r) => ({ period: r.period, estimate: r.estimate, ...(r.value !== undefined ? { value: r.value } : {}) })),
    effects: body.effects.map((e) => ({
      id: e.id,
      ...(e.covariate !== undefined ? { covariate: e.covariate } : {}),
      estimate: e.estimate,
      ...(e.value !== undefined ? { value: e.value } : {}),
    })),
  };
}

// ---------------------------------------------------------------- models

function modelRows(dataSource: DataSource, where: string, params: unknown[]): ModelRow[] {
  return syncDb(dataSource)
    .prepare(
      `SELECT m.*, u."name" AS "creatorName" FROM "model_specs" m LEFT JOIN "users" u ON u."id" = m."createdById" WHERE ${where} ORDER BY m."id" DESC`,
    )
    .all(...params) as ModelRow[];
}

export function getModelRow(dataSource: DataSource, studyId: number, modelId: number): ModelRow | null {
  return modelRows(dataSource, `m."studyId" = ? AND m."id" = ?`, [studyId, modelId])[0] ?? null;
}

function fitRows(dataSource: DataSource, where: string, params: unknown[]): FitRowDb[] {
  return syncDb(dataSource)
    .prepare(`SELECT f.*, u."name" AS "creatorName" FROM "fits" f LEFT JOIN "users" u ON u."id" = f."createdById" WHERE ${where} ORDER BY f."id" DESC`)
    .all(...params) as FitRowDb[];
}

function summaryOfModel(dataSource: DataSource, row: ModelRow): ModelSummary {
  const spec = JSON.parse(row.spec) as StoredSpec;
  const fits = fitRows(dataSource, `f."modelId" = ?`, [row.id]);
  const jobs = jobStatuses(dataSource, fits);
  const latest = fits[0];
  return {
    id: row.id,
    studyId: row.studyId,
    name: row.name,
    description: row.description,
    periods: sortedRates(spec).map((r) => r.period),
    effectCount: spec.effects.length,
    estimatedCount: spec.rates.filter((r) => r.estimate).length + spec.effects.filter((e) => e.estimate).length,
    fitCount: fits.length,
    latestFit: latest
      ? {
          id: latest.id,
          state: fitState(latest, jobs.get(latest.jobId ?? -1)),
          mode: latest.mode as 'estimate' | 'fixed',
          converged: convergedOf(latest),
          createdAt: iso(latest.createdAt)!,
        }
      : null,
    createdBy: row.creatorName ?? null,
    createdAt: iso(row.createdAt)!,
    updatedAt: iso(row.updatedAt)!,
  };
}

export function listModels(dataSource: DataSource, studyId: number): ModelSummary[] {
  return modelRows(dataSource, `m."studyId" = ?`, [studyId]).map((row) => summaryOfModel(dataSource, row));
}

export async function modelDetail(dataSource: DataSource, row: ModelRow): Promise<ModelDetail> {
  const spec = JSON.parse(row.spec) as StoredSpec;
  let notes: ModelNote[] = [];
  try {
    notes = checkSpecAgainstData(await loadStudyData(dataSource, row.studyId), spec);
  } catch (error) {
    notes = [{ severity: 'error', code: 'no_data', path: '', message: `The study's data cannot be read: ${(error as Error).message}` }];
  }
  return {
    ...summaryOfModel(dataSource, row),
    rates: sortedRates(spec).map((r) => ({
      period: r.period,
      key: rateKey(r.period),
      label: `Rate, period ${r.period}`,
      estimate: r.estimate,
      value: r.value ?? null,
    })),
    effects: spec.effects.map((e) => ({
      id: e.id as EffectId,
      ...(e.covariate ? { covariate: e.covariate } : {}),
      key: effectKey(e),
      label: parameterLabel(effectKey(e)),
      estimate: e.estimate,
      value: e.value ?? null,
    })),
    notes,
  };
}

/** Checks a model body against the study's data; returns every note (errors and warnings). */
export async function checkModel(dataSource: DataSource, studyId: number, body: ParsedModelSpecBody): Promise<ModelNote[]> {
  const data = await studyData(dataSource, studyId);
  return checkSpecAgainstData(data, specOf(body));
}

export async function createModel(dataSource: DataSource, studyId: number, userId: number, body: ParsedModelSpecBody): Promise<number> {
  const data = await studyData(dataSource, studyId);
  const spec = specOf(body);
  refuseOnErrors(checkSpecAgainstData(data, spec));
  return inSyncTransaction(syncDb(dataSource), (db) => {
    const now = sqlNow();
    const result = db
      .prepare(
        `INSERT INTO "model_specs" ("studyId", "name", "description", "spec", "createdById", "createdAt", "updatedAt") VALUES (?, ?, ?, ?, ?, ?, ?)`,
      )
      .run(studyId, body.name, body.description, JSON.stringify(spec), userId, now, now);
    return Number(result.lastInsertRowid);
  });
}

export interface ModelUpdate {
  name?: string;
  description?: string;
  rates?: StoredSpec['rates'];
  effects?: StoredSpec['effects'];
}

export async function updateModel(dataSource: DataSource, row: ModelRow, update: ModelUpdate): Promise<void> {
  const current = JSON.parse(row.spec) as StoredSpec;
  const merged = {
    name: update.name ?? row.name,
    description: update.description ?? row.description,
    rates: update.rates ?? current.rates,
    effects: update.effects ?? current.effects,
  };
  const parsed = modelSpecBodySchema.safeParse(merged);
  if (!parsed.success) {
    const fields: Record<string, string[]> = {};
    for (const issue of parsed.error.issues) (fields[issue.path.map(String).join('.')] ??= []).push(issue.message);
    throw badRequest(`The changed model is not valid: ${Object.values(fields).flat().join(' ')}`, { fields }, 'validation_failed');
  }
  const spec = specOf(parsed.data);
  if (update.rates || update.effects) {
    const data = await studyData(dataSource, row.studyId);
    refuseOnErrors(checkSpecAgainstData(data, spec));
  }
  await inSyncTransaction(syncDb(dataSource), (db) => {
    db.prepare(`UPDATE "model_specs" SET "name" = ?, "description" = ?, "spec" = ?, "updatedAt" = ? WHERE "id" = ?`).run(
      parsed.data.name,
      parsed.data.description,
      JSON.stringify(spec),
      sqlNow(),
      row.id,
    );
  });
}

/** Deletes a model and its fits; running fits are cancelled first. */
export async function deleteModel(dataSource: DataSource, row: ModelRow): Promise<void> {
  const fits = fitRows(dataSource, `f."modelId" = ?`, [row.id]);
  const queue = jobQueueFor(dataSource);
  for (const f of fits) {
    if (f.jobId !== null && (f.state === 'queued' || f.state === 'running')) await queue.cancel(f.jobId, 'its model was deleted');
  }
  await inSyncTransaction(syncDb(dataSource), (db) => {
    db.prepare(`DELETE FROM "fits" WHERE "modelId" = ?`).run(row.id);
    db.prepare(`DELETE FROM "model_specs" WHERE "id" = ?`).run(row.id);
  });
}

// ---------------------------------------------------------------- fits

function jobStatuses(dataSource: DataSource, fits: FitRowDb[]): Map<number, JobStatus> {
  const ids = fits.map((f) => f.jobId).filter((id): id is number => id !== null);
  return jobQueueFor(dataSource).statuses(ids);
}

function fitState(row: FitRowDb, job: JobStatus | undefined): FitState {
  if (row.state === 'done' || row.state === 'failed' || row.state === 'cancelled') return row.state;
  if (job) return job.state;
  return row.state as FitState;
}

function convergedOf(row: FitRowDb): boolean | null {
  if (!row.results || row.mode !== 'estimate') return null;
  return (JSON.parse(row.results) as FitResults).converged;
}

function fitSummary(row: FitRowDb, job: JobStatus | undefined): FitSummary {
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
function parameterKeys(spec: StoredSpec): string[] {
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
function readDerivative(row: FitRowDb): number[][] | null {
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
