/**
 * A Fit's parameters as the model a batch simulates. Reads the models module's `fits` table
 * (server/models/entities.ts): a finished fit has its FitResults JSON (shared/models.ts) with one
 * rate per covered period and one value per effect. The batch keeps its own copy of the values, so it
 * stays reproducible if the fit is later removed.
 */
import type { DataSource } from 'typeorm';
import type { BatchModel } from '../../shared/batches';
import { effectInfo, isEffectId } from '../../shared/effects';
import type { FitResults } from '../../shared/models';
import { syncDb } from '../db/sync';

export class FitNotUsable extends Error {}

/**
 * The model of fit `fitId` of study `studyId`, rates indexed by period - 1 (null where the fit does not
 * cover the period). Null when there is no such fit in this study; throws FitNotUsable (with a plain
 * message) for a fit that has not finished.
 */
export function fitModel(dataSource: DataSource, studyId: number, fitId: number, periodCount: number): BatchModel | null {
  let row: { state: string; results: string | null } | undefined;
  try {
    row = syncDb(dataSource).prepare(`SELECT "state", "results" FROM "fits" WHERE "id" = ? AND "studyId" = ?`).get(fitId, studyId) as typeof row;
  } catch {
    return null; // no fits table in this database
  }
  if (!row) return null;
  if (!row.results) {
    throw new FitNotUsable(`Fit ${fitId} has no results (it is ${row.state}); a batch simulates a finished fit.`);
  }
  const results = JSON.parse(row.results) as FitResults;
  const rates: (number | null)[] = new Array<number | null>(periodCount).fill(null);
  const effects: BatchModel['effects'] = [];
  for (const p of results.parameters) {
    if (p.kind === 'rate') {
      if (p.period != null && p.period >= 1 && p.period <= periodCount) rates[p.period - 1] = p.value;
    } else {
      if (!p.effectId || !isEffectId(p.effectId)) throw new FitNotUsable(`Fit ${fitId} has an effect this version does not know (${String(p.effectId)}).`);
      effects.push({
        id: p.effectId,
        ...(p.covariate ? { covariate: p.covariate } : {}),
        label: p.label || effectInfo(p.effectId).label,
        value: p.value,
      });
    }
  }
  if (effects.length === 0) throw new FitNotUsable(`Fit ${fitId} has no effect parameters.`);
  return { source: 'fit', fitId, rates, effects };
}
