/**
 * Comparing two to four candidate models side by side: per parameter the value with its standard error
 * and convergence t-ratio (the better one per row is the smallest |t|), per statistic and period the
 * Mahalanobis p-value with the team's verdict (the better one per row is the highest p), and the
 * verdict counts. Items are batches (a fit's simulated check) or fits (estimates only).
 */
import type { DataSource } from 'typeorm';
import type { FitResults } from '../../shared/models';
import { parameterLabel } from '../../shared/models';
import {
  bestIndex,
  countVerdicts,
  MAX_COMPARE,
  MIN_COMPARE,
  type CompareColumn,
  type CompareEstimateCell,
  type CompareEstimateRow,
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
  params: Map<string, CompareEstimateCell & { label: string; kind: 'rate' | 'objective' }>;
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
    const cells = items.map((it) => {
      const p = it.params.get(key);
      return p ? { value: p.value, se: p.se, convergenceT: p.convergenceT } : null;
    });
    const info = items.map((it) => it.params.get(key)).find((p) => p !== undefined)!;
    return {
      key,
      label: info.label,
      kind: info.kind,
      cells,
      better: bestIndex(
        cells.map((c) => (c?.convergenceT == null ? null : Math.abs(c.convergenceT))),
        'lower',
      ),
    };
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
    const cells = gofs.map((g, i) => {
      const r = g?.find((x) => x.statistic === k.statistic && x.period === k.period);
      if (!r) return null;
      return { pValue: r.pValue, verdict: verdictMaps[i]?.get(`${k.statistic}@${k.period}`)?.verdict ?? null };
    });
    return {
      statistic: k.statistic as ComparePRow['statistic'],
      label: k.label,
      period: k.period,
      cells,
      better: bestIndex(
        cells.map((c) => c?.pValue ?? null),
        'higher',
      ),
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
  return { studyId, columns: items.map((it) => it.column), estimates, pValues, verdicts, notes };
}
