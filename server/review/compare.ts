/**
 * Comparing two to four candidate models side by side:
 * - per parameter the estimate, its standard error and the t-statistic estimate / SE with a
 *   significance word (normal quantiles, common practice; rates are not tested against 0). The
 *   fit's convergence t-ratio is kept in the cell but is no mark of a better model: convergence is
 *   shown per model as a pass/fail line (CompareColumn.converged).
 * - per statistic and period the Mahalanobis p-value with its Monte Carlo standard error
 *   sqrt(p(1 - p) / N) for N chains (Davison & Hinkley 1997, Bootstrap Methods and their
 *   Application, section 4.2.5 on the simulation error of Monte Carlo p-values), and the team's
 *   verdict. A p-value is marked better only when it exceeds every other column's by more than
 *   2 x the combined Monte Carlo SE, sqrt(se_a^2 + se_b^2).
 * - per model how many statistics fail at 0.05 and the summed Mahalanobis distance (with the
 *   caution that p-values of different statistics come from the same chains and are not independent).
 * Items are batches (a fit's simulated check) or fits (estimates only).
 */
import type { DataSource } from 'typeorm';
import type { FitResults } from '../../shared/models';
import { parameterLabel } from '../../shared/models';
import {
  BETTER_MC_SE_FACTOR,
  betterPValue,
  countVerdicts,
  FAIL_LEVEL,
  monteCarloSe,
  significanceOf,
  MAX_COMPARE,
  MIN_COMPARE,
  type CompareColumn,
  type CompareEstimateCell,
  type CompareEstimateRow,
  type CompareOverall,
  type ComparePCell,
  type ComparePRow,
  type CompareResponse,
  type VerdictCounts,
} from '../../shared/review';
import { getBatch, type LoadedBatch } from '../batches/service';
import { syncDb } from '../db/sync';
import type { GofCache } from './gofData';
import { ApiError } from '../errors';
import { cardsOf, verdictsOf } from './service';

interface FitInfo {
  id: number;
  modelName: string;
  seed: number;
  state: string;
  results: FitResults | null;
}

export function fitInfo(dataSource: DataSource, studyId: number, fitId: number): FitInfo | null {
  const row = syncDb(dataSource)
    .prepare(`SELECT f."id", f."seed", f."state", f."results", m."name" AS "modelName" FROM "fits" f JOIN "model_specs" m ON m."id" = f."modelId" WHERE f."studyId" = ? AND f."id" = ?`)
    .get(studyId, fitId) as { id: number; seed: number; state: string; results: string | null; modelName: string } | undefined;
  if (!row) return null;
  return { id: row.id, modelName: row.modelName, seed: Number(row.seed), state: row.state, results: row.results ? (JSON.parse(row.results) as FitResults) : null };
}

interface Item {
  column: CompareColumn;
  params: Map<string, Pick<CompareEstimateCell, 'value' | 'se' | 'convergenceT'> & { label: string; kind: 'rate' | 'objective' }>;
  batch: LoadedBatch | null;
}

function paramsOfFit(results: FitResults): Item['params'] {
  const map: Item['params'] = new Map();
  for (const p of results.parameters) map.set(p.key, { value: p.value, se: p.se, convergenceT: p.convergenceT, label: p.label || parameterLabel(p.key), kind: p.kind });
  return map;
}

function paramsOfBatch(batch: LoadedBatch): Item['params'] {
  const map: Item['params'] = new Map();
  batch.model.rates.forEach((r, k) => {
    if (r !== null) map.set(`rate:${k + 1}`, { value: r, se: null, convergenceT: null, label: parameterLabel(`rate:${k + 1}`), kind: 'rate' });
  });
  for (const e of batch.model.effects) {
    const key = e.covariate ? `${e.id}:${e.covariate}` : e.id;
    map.set(key, { value: e.value, se: null, convergenceT: null, label: e.label, kind: 'objective' });
  }
  return map;
}

export function compareItems(
  dataSource: DataSource,
  gof: GofCache,
  studyId: number,
  batchIds: number[],
  fitIds: number[],
): CompareResponse {
  const total = batchIds.length + fitIds.length;
  if (total < MIN_COMPARE || total > MAX_COMPARE) {
    throw new ApiError(400, 'bad_request', `Choose ${MIN_COMPARE} to ${MAX_COMPARE} batches or fits to compare; ${total} ${total === 1 ? 'was' : 'were'} given.`);
  }
  const notes: string[] = [];
  const items: Item[] = [];
  for (const id of batchIds) {
    const batch = getBatch(dataSource, studyId, id);
    if (!batch) throw new ApiError(404, 'not_found', `Batch ${id} not found in this study.`);
    if (batch.summary.state !== 'done') throw new ApiError(409, 'batch_not_ready', `Batch ${id} ("${batch.row.label}") is ${batch.summary.state}; only finished batches can be compared.`);
    const fit = batch.row.fitId !== null ? fitInfo(dataSource, studyId, batch.row.fitId) : null;
    let params = paramsOfBatch(batch);
    if (fit?.results) {
      // The fit's own record has the standard errors and t-ratios; the values are the ones the batch copied.
      const fromFit = paramsOfFit(fit.results);
      params = new Map([...params].map(([k, v]) => [k, { ...v, se: fromFit.get(k)?.se ?? null, convergenceT: fromFit.get(k)?.convergenceT ?? null }]));
    } else if (batch.row.fitId !== null) {
      notes.push(`The fit of batch ${id} is no longer stored; its standard errors are not shown.`);
    }
    items.push({
      batch,
      params,
      column: {
        key: `batch:${id}`,
        kind: 'batch',
        batchId: id,
        fitId: batch.row.fitId,
        label: batch.row.label,
        modelName: fit?.modelName ?? (batch.model.source === 'hand-entered' ? 'Hand-entered values' : null),
        chains: batch.summary.chains,
        converged: fit?.results ? (fit.results.maxAbsT === null ? null : fit.results.converged) : null,
        maxAbsT: fit?.results?.maxAbsT ?? null,
        tauMax: fit?.results?.tauMax ?? null,
      },
    });
  }
  for (const id of fitIds) {
    const fit = fitInfo(dataSource, studyId, id);
    if (!fit) throw new ApiError(404, 'not_found', `Fit ${id} not found in this study.`);
    if (!fit.results) throw new ApiError(409, 'batch_not_ready', `Fit ${id} has no results yet (it is ${fit.state}).`);
    items.push({
      batch: null,
      params: paramsOfFit(fit.results),
      column: {
        key: `fit:${id}`,
        kind: 'fit',
        batchId: null,
        fitId: id,
        label: `Fit ${id}`,
        modelName: fit.modelName,
        chains: null,
        converged: fit.results.maxAbsT === null ? null : fit.results.converged,
        maxAbsT: fit.results.maxAbsT,
        tauMax: fit.results.tauMax,
      },
    });
  }

  // Parameters: rates first (by period), then effects in order of first appearance.
  const keys: string[] = [];
  for (const it of items) for (const k of it.params.keys()) if (!keys.includes(k)) keys.push(k);
  const rateKeys = keys.filter((k) => k.startsWith('rate:')).sort((a, b) => Number(a.slice(5)) - Number(b.slice(5)));
  const ordered = [...rateKeys, ...keys.filter((k) => !k.startsWith('rate:'))];
  const estimates: CompareEstimateRow[] = ordered.map((key) => {
    const cells = items.map((it): CompareEstimateCell | null => {
      const p = it.params.get(key);
      if (!p) return null;
      // Rates are positive by construction: a test against 0 says nothing, so they get no t.
      const t = p.kind === 'objective' && p.se !== null && p.se > 0 ? p.value / p.se : null;
      return { value: p.value, se: p.se, convergenceT: p.convergenceT, t, significance: significanceOf(t) };
    });
    const info = items.map((it) => it.params.get(key)).find((p) => p !== undefined)!;
    return { key, label: info.label, kind: info.kind, cells };
  });

  // p-values per statistic and period, over the union of the batches' cards.
  const gofs = items.map((it) => (it.batch ? gof.all(dataSource, it.batch) : null));
  const verdictMaps = items.map((it) => (it.batch ? verdictsOf(syncDb(dataSource), it.batch.row.id) : null));
  const rowKeys: { statistic: string; label: string; period: number }[] = [];
  for (const g of gofs) {
    for (const r of g ?? []) {
      if (!rowKeys.some((k) => k.statistic === r.statistic && k.period === r.period)) rowKeys.push({ statistic: r.statistic, label: r.label, period: r.period });
    }
  }
  rowKeys.sort((a, b) => a.period - b.period);
  const pValues: ComparePRow[] = rowKeys.map((k) => {
    const cells = gofs.map((g, i): ComparePCell | null => {
      const r = g?.find((x) => x.statistic === k.statistic && x.period === k.period);
      if (!r) return null;
      return { pValue: r.pValue, mcSe: monteCarloSe(r.pValue, r.chains), distance: r.distance, verdict: verdictMaps[i]?.get(`${k.statistic}@${k.period}`)?.verdict ?? null };
    });
    return { statistic: k.statistic as ComparePRow['statistic'], label: k.label, period: k.period, cells, ...betterPValue(cells) };
  });
  const overall: (CompareOverall | null)[] = items.map((it, i) => {
    if (!it.batch) return null;
    const mine = pValues.map((r) => r.cells[i]).filter((c): c is ComparePCell => c !== null);
    const distances = mine.map((c) => c.distance).filter(Number.isFinite);
    return {
      failing: mine.filter((c) => c.pValue < FAIL_LEVEL).length,
      tested: mine.length,
      distanceSum: distances.length === mine.length && mine.length > 0 ? distances.reduce((a, b) => a + b, 0) : null,
    };
  });

  const verdicts: (VerdictCounts | null)[] = items.map((it, i) => {
    if (!it.batch) return null;
    const map = verdictMaps[i]!;
    return countVerdicts(cardsOf(it.batch).map((c) => map.get(`${c.statistic}@${c.period}`)?.verdict ?? null));
  });
  const chains = items.map((it) => it.column.chains).filter((c): c is number => c !== null);
  if (new Set(chains).size > 1) notes.push('The batches ran different numbers of chains, so their p-values have different resolutions (the smallest possible is 1/(chains + 1)).');
  const periodsDiffer = new Set(items.filter((it) => it.batch).map((it) => it.batch!.summary.periods.join(','))).size > 1;
  if (periodsDiffer) notes.push('The batches cover different periods; a dash marks a period a batch did not simulate.');
  if (periodsDiffer || new Set(pValues.map((r) => r.cells.filter((c) => c !== null).length)).size > 1) {
    notes.push('The models were not checked on the same statistics and periods, so their failure counts and summed distances are not directly comparable.');
  }
  const betterRule = `A p-value is marked better only when it exceeds each other model's by more than ${BETTER_MC_SE_FACTOR} combined Monte Carlo standard errors, ${BETTER_MC_SE_FACTOR} × sqrt(se1² + se2²), with se = sqrt(p(1 - p) / N) for N chains (p kept within 1/(N + 1) of 0 and 1).`;
  return { studyId, columns: items.map((it) => it.column), estimates, pValues, verdicts, overall, betterRule, notes };
}
