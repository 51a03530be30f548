/**
 * The goodness-of-fit views of a batch: per period and statistic the envelope bands and the
 * Mahalanobis test of the stored statistic vectors, the plain-words reading and cautions, the
 * summary over statistics, and the CSV of the simulated values. METHODS.md §5.
 */
import type { DataSource } from 'typeorm';
import type { AuxStatisticId } from '../../shared/auxStatistics';
import {
  FEW_CHAINS,
  fittedStatisticCaution,
  type BatchModel,
  type GofResponse,
  type GofSummaryResponse,
  type StatisticLayout,
} from '../../shared/batches';
import { csvLine } from '../../shared/csvSafe';
import { badRequest, conflict } from '../errors';
import { componentsOutside, envelope } from '../engine/gof/envelope';
import { mahalanobisTest, type MahalanobisResult, type SampleMatrix } from '../engine/gof/mahalanobis';
import { syncDb } from '../jobs';
import { float64FromBlob } from './jobKind';
import { layoutOffsets } from './layout';
import type { LoadedBatch } from './service';

/** All stored rows of one period, in chain order: chains x width. */
export function periodMatrix(dataSource: DataSource, batch: LoadedBatch, period: number): { chains: number; width: number; data: Float64Array } {
  const { width } = layoutOffsets(batch.layout);
  const rows = syncDb(dataSource)
    .prepare(`SELECT "firstChain", "chains", "data" FROM "batch_results" WHERE "batchId" = ? AND "period" = ? ORDER BY "firstChain"`)
    .all(batch.row.id, period) as { firstChain: number; chains: number; data: Buffer }[];
  const chains = rows.reduce((s, r) => s + r.chains, 0);
  const data = new Float64Array(chains * width);
  let at = 0;
  for (const r of rows) {
    if (r.firstChain * width !== at) throw new Error(`batch: stored chains of batch ${batch.row.id} are not contiguous at chain ${r.firstChain}`);
    const block = float64FromBlob(r.data);
    data.set(block, at);
    at += block.length;
  }
  return { chains, width, data };
}

/** The columns of one statistic as a SampleMatrix. */
export function statisticSample(matrix: { chains: number; width: number; data: Float64Array }, offset: number, length: number): SampleMatrix {
  const out = new Float64Array(matrix.chains * length);
  for (let s = 0; s < matrix.chains; s++) {
    for (let k = 0; k < length; k++) out[s * length + k] = matrix.data[s * matrix.width + offset + k];
  }
  return { rows: matrix.chains, cols: length, data: out };
}

export const fmtP = (p: number) => (p < 0.001 ? p.toExponential(1) : p.toFixed(3));

/** The p-value in plain words (our wording; the verdict stays the team's). */
export function readingOf(test: MahalanobisResult, label: string, components: string[]): string {
  const N = test.chains;
  const asFar = Math.round(test.pValue * (N + 1) - 1);
  const oos = test.outOfSupport.length
    ? `The observed network has ${test.outOfSupport.map((o) => `${components[o.component]} = ${o.observed}`).join(', ')}, which no simulated network had (all gave ${test.outOfSupport
        .map((o) => o.simulated)
        .join(', ')}). `
    : '';
  if (test.componentsKept === 0) return `${oos}Every simulated network gave the same ${label.toLowerCase()}, so there is nothing to test.`;
  const p = fmtP(test.pValue);
  if (test.pValue < 0.05) {
    return `${oos}Poor fit: only ${asFar} of ${N} simulated networks were at least as far from the common average as the observed one (p = ${p}).`;
  }
  if (test.pValue < 0.1) {
    return `${oos}Borderline: ${asFar} of ${N} simulated networks were at least as far from the common average as the observed one (p = ${p}).`;
  }
  return `${oos}Acceptable fit for the ${label.toLowerCase()}: the observed values are typical of the simulated ones; ${asFar} of ${N} simulated networks were at least as far from their average (p = ${p}).`;
}

export function cautionOf(test: MahalanobisResult, statistic: AuxStatisticId, model: BatchModel, simulatedOnlyP?: number): string | null {
  const parts: string[] = [];
  if (simulatedOnlyP !== undefined && (test.pValue < 0.05) !== (simulatedOnlyP < 0.05)) {
    parts.push(
      `Measuring against the simulated networks alone (leaving the observed one out of the average and spread) gives p = ${fmtP(simulatedOnlyP)} instead of ${fmtP(test.pValue)}: the verdict hinges on rare values few simulations share.`,
    );
  }
  const fitted = fittedStatisticCaution(
    statistic,
    model.effects.map((e) => e.id),
  );
  if (fitted) parts.push(fitted);
  const N = test.chains;
  const floor = 1 / (N + 1);
  if (N < FEW_CHAINS || test.pValue <= floor * (1 + 1e-9)) {
    parts.push(
      `With ${N} chains a p-value below 1/(N+1) = ${fmtP(floor)} cannot be told apart: the smallest possible value is ${fmtP(floor)}${
        test.pValue <= floor * (1 + 1e-9) ? ', and this statistic reached it' : ''
      }. Run more chains to resolve smaller p-values.`,
    );
  }
  return parts.length ? parts.join(' ') : null;
}

export function checkPeriod(batch: LoadedBatch, raw: unknown): number {
  const periods = batch.summary.periods;
  if (raw === undefined || raw === '') return periods[0];
  const p = Number(raw);
  if (!Number.isInteger(p) || !periods.includes(p)) {
    throw badRequest(`This batch simulated period${periods.length > 1 ? 's' : ''} ${periods.join(', ')}; there is no period "${String(raw)}" in it.`);
  }
  return p;
}

export function checkStatistic(batch: LoadedBatch, raw: unknown): { layout: StatisticLayout; offset: number } {
  const ids = batch.layout.map((l) => l.statistic);
  const id = raw === undefined || raw === '' ? ids[0] : String(raw);
  const index = ids.indexOf(id as AuxStatisticId);
  if (index < 0) {
    throw badRequest(`This batch has no statistic "${id}"; it has ${ids.join(', ')}.`);
  }
  const { offsets } = layoutOffsets(batch.layout);
  return { layout: batch.layout[index], offset: offsets.get(ids[index])! };
}

export function parseCoverages(raw: unknown): number[] {
  if (raw === undefined || raw === '') return [0.5, 0.9];
  const parts = String(raw).split(',').map((s) => Number(s.trim()));
  if (parts.length === 0 || parts.length > 5 || parts.some((g) => !(g > 0 && g < 1))) {
    throw badRequest('Coverages are up to five numbers between 0 and 1, separated by commas (e.g. 0.5,0.9).');
  }
  return parts;
}

export function gofOf(
  batch: LoadedBatch,
  matrix: { chains: number; width: number; data: Float64Array },
  statistic: { layout: StatisticLayout; offset: number },
  period: number,
  coverages: number[],
): GofResponse {
  const { layout, offset } = statistic;
  const components = layout.components;
  if (matrix.chains < 2) throw conflict('batch_not_ready', 'This batch has fewer than two chains stored; there is nothing to compare.');
  const sample = statisticSample(matrix, offset, components.length);
  const observed = batch.observed[String(period)]?.[layout.statistic];
  if (!observed) throw new Error(`batch: no observed ${layout.statistic} for period ${period}`);
  const env = envelope(sample, coverages);
  // Headline: the observed vector counted in the mean and covariance with the simulated ones, so all N + 1
  // networks are treated alike and the p-value is exactly uniform when the observed network comes from the
  // model (a Monte Carlo test needs exchangeability: Davison & Hinkley 1997, ch. 4). The form with the
  // simulated vectors alone (METHODS.md 5; Lospinoso & Snijders 2019) rejects too often when components are
  // rare (tests/gof/calibration.test.ts), so it is reported beside the headline, not as the verdict.
  const test = mahalanobisTest(sample, observed, { reference: 'pooled' });
  const simulatedOnly = mahalanobisTest(sample, observed);
  return {
    batchId: batch.row.id,
    statistic: layout.statistic,
    label: layout.label,
    period,
    components,
    observed,
    mean: env.mean,
    median: env.median,
    min: env.min,
    max: env.max,
    bands: env.bands.map((b) => ({ ...b, outside: componentsOutside(b, observed).map((k) => components[k]) })),
    test: {
      distance: test.distanceObserved,
      pValue: test.pValue,
      pValueSimulatedOnly: simulatedOnly.pValue,
      chains: test.chains,
      componentsKept: test.componentsKept,
      constantComponents: test.constantComponents.map((k) => components[k]),
      outOfSupport: test.outOfSupport.map((o) => ({ component: components[o.component], observed: o.observed, simulated: o.simulated })),
    },
    reading: readingOf(test, layout.label, components),
    caution: cautionOf(test, layout.statistic, batch.model, simulatedOnly.pValue),
  };
}

export function gofSummaryOf(batch: LoadedBatch, matrix: { chains: number; width: number; data: Float64Array }, period: number, coverages: number[]): GofSummaryResponse {
  const { offsets } = layoutOffsets(batch.layout);
  const gofs = batch.layout.map((layout) => gofOf(batch, matrix, { layout, offset: offsets.get(layout.statistic)! }, period, coverages));
  return gofSummaryFrom(batch, gofs, period, coverages);
}

/** The summary of a period from its statistics' GofResponses (as stored by gofStore.ts). */
export function gofSummaryFrom(batch: Pick<LoadedBatch, 'row'>, gofs: GofResponse[], period: number, coverages: number[]): GofSummaryResponse {
  const rows = gofs.map((g) => {
    const wide = g.bands.reduce((a, b) => (b.coverage > a.coverage ? b : a), g.bands[0]);
    return {
      statistic: g.statistic,
      label: g.label,
      pValue: g.test.pValue,
      pValueSimulatedOnly: g.test.pValueSimulatedOnly,
      distance: g.test.distance,
      componentsKept: g.test.componentsKept,
      outOfSupport: g.test.outOfSupport.length,
      outsideWide: wide ? wide.outside : [],
      reading: g.reading,
      caution: g.caution,
    };
  });
  return { batchId: batch.row.id, period, chains: gofs[0]?.test.chains ?? 0, coverages, rows };
}

export function statisticsCsv(batch: LoadedBatch, matrix: { chains: number; width: number; data: Float64Array }, statistic: { layout: StatisticLayout; offset: number }, period: number): string {
  const { layout, offset } = statistic;
  // Cells through shared/csvSafe.ts, like every CSV the product writes (no cell can start a formula).
  const lines = [csvLine(['chain', ...layout.components.map((c) => `${layout.statistic}:${c}`)])];
  for (let s = 0; s < matrix.chains; s++) {
    const values: number[] = [s + 1];
    for (let k = 0; k < layout.components.length; k++) values.push(matrix.data[s * matrix.width + offset + k]);
    lines.push(csvLine(values));
  }
  return lines.join('\n') + '\n';
}

// ---------------------------------------------------------------- consensus
