/**
 * Models: storing, checking, listing and deleting model specifications. Their fits are in ./fits.ts,
 * the stored rows in ./rows.ts. Refusals throw ApiError (../errors.ts; the error handler answers with
 * it) and store nothing.
 */
import type { DataSource } from 'typeorm';
import type { EffectId } from '../../shared/effects';
import {
  modelSpecBodySchema,
  parameterLabel,
  type ModelDetail,
  type ModelNote,
  type ModelSummary,
  type ParsedModelSpecBody,
} from '../../shared/models';
import { loadStudyData } from '../data/store';
import { badRequest } from '../errors';
import { inSyncTransaction, jobQueueFor, sqlNow, syncDb } from '../jobs';
import { checkSpecAgainstData, effectKey, rateKey, sortedRates, type StoredSpec } from './modelData';
import {
  convergedOf,
  fitRows,
  fitState,
  iso,
  jobStatuses,
  modelRows,
  refuseOnErrors,
  specOf,
  studyData,
  type ModelRow,
} from './rows';

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
