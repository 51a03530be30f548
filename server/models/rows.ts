/**
 * The rows of models and fits as stored, and what the model and fit services both need: the study's
 * data (or a plain refusal), the spec of a body, and a fit's state and convergence from its job.
 */
import type { DataSource } from 'typeorm';
import type { FitResults, FitState, ModelNote } from '../../shared/models';
import { loadStudyData, type LoadedStudyData } from '../data/store';
import type { FitRow } from './entities';
import { badRequest } from '../errors';
import { jobQueueFor, parseSqlDate, syncDb, type JobStatus } from '../jobs';
import type { StoredSpec } from './modelData';

export interface ModelRow {
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

/** A fits row as raw SQL returns it: the entity's columns, with the dates as SQLite's text. */
export type FitRowDb = Omit<FitRow, 'createdAt' | 'finishedAt' | 'study' | 'model' | 'job' | 'createdBy'> & {
  createdAt: string;
  finishedAt: string | null;
  creatorName?: string | null;
};

export const iso = (value: string | null | undefined): string | null => parseSqlDate(value)?.toISOString() ?? null;

export async function studyData(dataSource: DataSource, studyId: number): Promise<LoadedStudyData> {
  try {
    return await loadStudyData(dataSource, studyId);
  } catch {
    throw badRequest('This study has no data yet: upload at least two waves before making a model.');
  }
}

/** Turns error notes into a 400 validation_failed with messages per field. */
export function refuseOnErrors(notes: ModelNote[]): void {
  const errors = notes.filter((n) => n.severity === 'error');
  if (errors.length === 0) return;
  const fields: Record<string, string[]> = {};
  for (const e of errors) (fields[e.path] ??= []).push(e.message);
  throw badRequest(`The model does not suit this study's data: ${errors.map((e) => e.message).join(' ')}`, { fields, notes }, 'validation_failed');
}

export function specOf(body: { rates: StoredSpec['rates']; effects: StoredSpec['effects'] }): StoredSpec {
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

export function modelRows(dataSource: DataSource, where: string, params: unknown[]): ModelRow[] {
  return syncDb(dataSource)
    .prepare(
      `SELECT m.*, u."name" AS "creatorName" FROM "model_specs" m LEFT JOIN "users" u ON u."id" = m."createdById" WHERE ${where} ORDER BY m."id" DESC`,
    )
    .all(...params) as ModelRow[];
}

export function getModelRow(dataSource: DataSource, studyId: number, modelId: number): ModelRow | null {
  return modelRows(dataSource, `m."studyId" = ? AND m."id" = ?`, [studyId, modelId])[0] ?? null;
}

export function fitRows(dataSource: DataSource, where: string, params: unknown[]): FitRowDb[] {
  return syncDb(dataSource)
    .prepare(`SELECT f.*, u."name" AS "creatorName" FROM "fits" f LEFT JOIN "users" u ON u."id" = f."createdById" WHERE ${where} ORDER BY f."id" DESC`)
    .all(...params) as FitRowDb[];
}

export function jobStatuses(dataSource: DataSource, fits: FitRowDb[]): Map<number, JobStatus> {
  const ids = fits.map((f) => f.jobId).filter((id): id is number => id !== null);
  return jobQueueFor(dataSource).statuses(ids);
}

export function fitState(row: FitRowDb, job: JobStatus | undefined): FitState {
  if (row.state === 'done' || row.state === 'failed' || row.state === 'cancelled') return row.state;
  if (job) return job.state;
  return row.state as FitState;
}

export function convergedOf(row: FitRowDb): boolean | null {
  if (!row.results || row.mode !== 'estimate') return null;
  return (JSON.parse(row.results) as FitResults).converged;
}
