/**
 * Batches on the server: making one (checked against the study's data, stored with its job in one
 * transaction), reading them with live progress, and the goodness-of-fit views computed from the
 * stored rows (envelopes, Mahalanobis test, consensus networks, CSV).
 */
import { randomInt } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { AuxStatisticId } from '../../shared/auxStatistics';
import {
  FEW_CHAINS,
  fittedStatisticCaution,
  type BatchDetail,
  type BatchModel,
  type BatchState,
  type BatchSummary,
  type ConsensusResponse,
  type GofResponse,
  type GofSummaryResponse,
  type ParsedCreateBatchBody,
  type StatisticLayout,
} from '../../shared/batches';
import { effectInfo, type EffectId } from '../../shared/effects';
import { loadStudyData, type LoadedStudyData } from '../data/store';
import { compareNetworks, consensusAtThreshold, consensusTopL, TieFrequencies } from '../engine/consensus';
import { buildEffects } from '../engine/effects';
import { deriveSeed } from '../engine/prng';
import { NetworkState } from '../engine/state';
import { auxStatistic } from '../engine/statistics';
import { componentsOutside, envelope } from '../engine/gof/envelope';
import { mahalanobisTest, type MahalanobisResult, type SampleMatrix } from '../engine/gof/mahalanobis';
import { createJobRow, inSyncTransaction, jobQueueFor, parseSqlDate, sqlNow, syncDb, type JobStatus } from '../jobs';
import { BATCH_JOB_KIND, float64FromBlob, int32FromBlob, type BatchJobPayload } from './jobKind';
import { auxOptionsOf, buildLayout, layoutOffsets, resolveMaxima, type ResolvedMaxima } from './layout';
import { fitModel, FitNotUsable } from './fitModel';
import { periodCovariates, periodNetworks } from '../data/periods';

/** A refusal with a plain message; the routes turn it into a 400 (or the given status). */
export class BatchInputError extends Error {
  constructor(
    message: string,
    readonly status = 400,
    readonly code: 'bad_request' | 'not_found' | 'validation_failed' = 'bad_request',
    readonly details?: unknown,
  ) {
    super(message);
  }
}

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
    throw new BatchInputError(
      `The study has ${M} waves, so the model needs ${M - 1} rate${M - 1 === 1 ? '' : 's'} (one per period); ${model.rates.length} ${model.rates.length === 1 ? 'was' : 'were'} given.`,
    );
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
      throw new BatchInputError(`The model does not fit this study's data: ${(error as Error).message.replace(/^effects: /, '')}`);
    }
    const rate = model.rates[p - 1] ?? 0;
    const expected = n * rate;
    if (expected > MAX_EXPECTED_MINISTEPS) {
      throw new BatchInputError(
        `The rate of period ${p} (${rate}) means about ${Math.round(expected)} ministeps per chain for ${n} actors, more than ${MAX_EXPECTED_MINISTEPS}; check the rates.`,
      );
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

/** Makes a batch and queues its job. Refusals throw BatchInputError and store nothing. */
export async function createBatch(dataSource: DataSource, input: CreateBatchInput): Promise<number> {
  const { studyId, userId, body } = input;
  let data: LoadedStudyData;
  try {
    data = await loadStudyData(dataSource, studyId);
  } catch {
    throw new BatchInputError('This study has no data yet: upload at least two waves before simulating.');
  }
  const M = data.waves.length;
  let model: BatchModel;
  if (body.fitId !== undefined) {
    let resolved: BatchModel | null;
    try {
      resolved = fitModel(dataSource, studyId, body.fitId, M - 1);
    } catch (error) {
      if (error instanceof FitNotUsable) throw new BatchInputError(error.message, 409);
      throw error;
    }
    if (!resolved) throw new BatchInputError('Fit not found in this study.', 404, 'not_found');
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
    throw new BatchInputError(`The study has ${M - 1} period${M - 1 === 1 ? '' : 's'} (${M} waves); there is no period ${badPeriod}.`);
  }
  const uncovered = periods.find((p) => model.rates[p - 1] == null);
  if (uncovered !== undefined) {
    throw new BatchInputError(`Fit ${model.fitId} does not cover period ${uncovered}; it covers period${covered.length === 1 ? '' : 's'} ${covered.join(', ')}.`);
  }
  checkModelAgainstData(model, data, periods);
  const n = data.actors.length;
  const statistics = body.statistics as AuxStatisticId[];
  const maxima = resolveMaxima(n, body.maxima ?? {});
  if (maxima.degree > n - 1 && body.maxima?.degree !== undefined) {
    throw new BatchInputError(`The largest degree shown can be at most ${n - 1} (the study has ${n} actors).`);
  }
  if (maxima.distance > Math.max(1, n - 1) && body.maxima?.distance !== undefined) {
    throw new BatchInputError(`The largest distance shown can be at most ${Math.max(1, n - 1)} (the study has ${n} actors).`);
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

const fmtP = (p: number) => (p < 0.001 ? p.toExponential(1) : p.toFixed(3));

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
    throw new BatchInputError(`This batch simulated period${periods.length > 1 ? 's' : ''} ${periods.join(', ')}; there is no period "${String(raw)}" in it.`);
  }
  return p;
}

export function checkStatistic(batch: LoadedBatch, raw: unknown): { layout: StatisticLayout; offset: number } {
  const ids = batch.layout.map((l) => l.statistic);
  const id = raw === undefined || raw === '' ? ids[0] : String(raw);
  const index = ids.indexOf(id as AuxStatisticId);
  if (index < 0) {
    throw new BatchInputError(`This batch has no statistic "${id}"; it has ${ids.join(', ')}.`);
  }
  const { offsets } = layoutOffsets(batch.layout);
  return { layout: batch.layout[index], offset: offsets.get(ids[index])! };
}

export function parseCoverages(raw: unknown): number[] {
  if (raw === undefined || raw === '') return [0.5, 0.9];
  const parts = String(raw).split(',').map((s) => Number(s.trim()));
  if (parts.length === 0 || parts.length > 5 || parts.some((g) => !(g > 0 && g < 1))) {
    throw new BatchInputError('Coverages are up to five numbers between 0 and 1, separated by commas (e.g. 0.5,0.9).');
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
  if (matrix.chains < 2) throw new BatchInputError('This batch has fewer than two chains stored; there is nothing to compare.', 409);
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
  const rows = batch.layout.map((layout) => {
    const g = gofOf(batch, matrix, { layout, offset: offsets.get(layout.statistic)! }, period, coverages);
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
  return { batchId: batch.row.id, period, chains: matrix.chains, coverages, rows };
}

export function statisticsCsv(batch: LoadedBatch, matrix: { chains: number; width: number; data: Float64Array }, statistic: { layout: StatisticLayout; offset: number }, period: number): string {
  const escape = (s: string) => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  const { layout, offset } = statistic;
  const lines = [['chain', ...layout.components.map((c) => `${layout.statistic}:${c}`)].map(escape).join(',')];
  for (let s = 0; s < matrix.chains; s++) {
    const values: string[] = [String(s + 1)];
    for (let k = 0; k < layout.components.length; k++) values.push(String(matrix.data[s * matrix.width + offset + k]));
    lines.push(values.join(','));
  }
  return lines.join('\n') + '\n';
}

// ---------------------------------------------------------------- consensus

export async function consensusOf(
  dataSource: DataSource,
  batch: LoadedBatch,
  period: number,
  query: { threshold?: unknown; top?: unknown },
): Promise<ConsensusResponse> {
  const top = query.top === '1' || query.top === 'true';
  let threshold = 0.5;
  if (!top && query.threshold !== undefined && query.threshold !== '') {
    threshold = Number(query.threshold);
    if (!(threshold > 0 && threshold <= 1)) throw new BatchInputError('The threshold is a share of chains: a number above 0 and at most 1 (e.g. 0.5).');
  }
  const row = syncDb(dataSource)
    .prepare(`SELECT "actors", "networks", "tieTotal", "counts" FROM "batch_tie_counts" WHERE "batchId" = ? AND "period" = ?`)
    .get(batch.row.id, period) as { actors: number; networks: number; tieTotal: number; counts: Buffer } | undefined;
  if (!row || row.networks === 0) throw new BatchInputError('No simulated networks are stored for this period.', 409);
  const n = row.actors;
  const freq = new TieFrequencies(n, int32FromBlob(row.counts), row.networks, row.tieTotal);
  const data = await loadStudyData(dataSource, batch.row.studyId);
  if (data.actors.length !== n) throw new BatchInputError('The study data changed after this batch was run.', 409);
  const net = periodNetworks(data)[period - 1];
  const consensus = top
    ? consensusTopL(freq, deriveSeed(batch.summary.seed, 0x70, period), net.compareMask)
    : consensusAtThreshold(freq, threshold, net.compareMask);
  const cmp = compareNetworks(n, consensus, net.end, net.compareMask);
  // Persistence: pairs observed in both waves.
  const startWave = data.waves[period - 1];
  const endWave = data.waves[period];
  const both = new Uint8Array(n * n);
  for (let k = 0; k < n * n; k++) both[k] = startWave[k] !== 2 && endWave[k] !== 2 && k % (n + 1) !== 0 ? 1 : 0;
  const persistence = compareNetworks(
    n,
    startWave.map((v) => (v === 1 ? 1 : 0)),
    endWave.map((v) => (v === 1 ? 1 : 0)),
    both,
  ).jaccard;
  const ties: Array<[number, number, number]> = [];
  let observedTies = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const k = i * n + j;
      if (consensus[k]) ties.push([i, j, freq.counts[k] / freq.networks]);
      if (net.compareMask[k] && net.end[k]) observedTies++;
    }
  }
  return {
    batchId: batch.row.id,
    period,
    mode: top ? 'top' : 'threshold',
    threshold: top ? null : threshold,
    top: top ? Math.round(freq.meanTies()) : null,
    actors: data.actors,
    ties,
    comparison: {
      pairs: cmp.pairs,
      matched: cmp.tp,
      missed: cmp.fn,
      extra: cmp.fp,
      jaccard: cmp.jaccard,
      precision: cmp.precision,
      recall: cmp.recall,
    },
    persistence,
    meanSimulatedTies: freq.meanTies(),
    observedTies,
    chains: freq.networks,
  };
}

