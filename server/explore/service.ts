/**
 * Explore the process: choice explanations and the first-ministep overview of a fit, replays of one
 * chain of a batch, and tie timelines over the chains of a batch. Everything is recomputed from the
 * stored parameters and seeds (server/engine/explore.ts); nothing is stored.
 *
 * A replay runs the batch worker's own `simulateChain` (same stream deriveSeed(batchSeed, chain, period),
 * same missing-pair overwrite, same statistics) with a ministep recorder attached, so it is the
 * batch's chain, and its end statistics are compared with the stored row.
 */
import type { DataSource } from 'typeorm';
import type { BatchModel } from '../../shared/batches';
import type { ChoiceResponse, ExploreEffect, OverviewResponse, ReplayResponse, TimelinesResponse } from '../../shared/explore';
import { DEFAULT_TIMELINE_POINTS } from '../../shared/explore';
import type { BatchContext } from '../batches/context';
import { fitModel, FitNotUsable } from '../batches/fitModel';
import { float64FromBlob, int32FromBlob, loadBatchContext } from '../batches/jobKind';
import { periodCovariates, periodNetworks } from '../data/periods';
import type { LoadedBatch } from '../batches/service';
import { simulateChain } from '../batches/worker';
import { loadStudyData, type LoadedStudyData } from '../data/store';
import { buildEffects } from '../engine/effects';
import { choiceMatrix, clusterOrder, evenGrid, explainChoice, MinistepLog, TieTimelines } from '../engine/explore';
import { deriveSeed } from '../engine/prng';
import { freePairMask } from '../engine/simulate';
import { NetworkState } from '../engine/state';
import { ApiError, badRequest, conflict, notFound } from '../errors';
import { syncDb } from '../db/sync';
import { seededLayout } from '../data/layout';

/** Refusals are ApiErrors with a plain message (400 bad input, 404 not here, 409 not ready); the error handler answers them. */
function refuse(message: string, status: 400 | 404 | 409 = 400): ApiError {
  if (status === 404) return notFound(message);
  if (status === 409) return conflict('batch_not_ready', message);
  return badRequest(message);
}

const plural = (k: number, word: string) => `${k} ${word}${k === 1 ? '' : 's'}`;

function edgesOf(n: number, adj: ArrayLike<number>, mask?: ArrayLike<number>): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && adj[i * n + j] && (mask === undefined || mask[i * n + j])) out.push([i, j]);
  return out;
}

// ---------------------------------------------------------------- fits

interface FitSetting {
  fitId: number;
  period: number;
  data: LoadedStudyData;
  model: BatchModel;
  rate: number;
  state: NetworkState;
  effects: ReturnType<typeof buildEffects>;
  params: number[];
  converged: boolean | null;
  /** n*n, 1 = may be offered; undefined when every pair is free. */
  allowed: Uint8Array | undefined;
  /** Actors absent in this period (no ministeps). */
  absent: number[];
}

async function fitSetting(dataSource: DataSource, studyId: number, fitId: number, period: number): Promise<FitSetting> {
  let data: LoadedStudyData;
  try {
    data = await loadStudyData(dataSource, studyId);
  } catch {
    throw refuse('This study has no network data yet.', 409);
  }
  const periods = data.waves.length - 1;
  let model: BatchModel | null;
  try {
    model = fitModel(dataSource, studyId, fitId, periods);
  } catch (error) {
    if (error instanceof FitNotUsable) throw refuse(error.message, 409);
    throw error;
  }
  if (!model) throw refuse('Fit not found.', 404);
  if (period > periods) throw refuse(`The study has ${plural(periods, 'period')} (${data.waves.length} waves); there is no period ${period}.`);
  const rate = model.rates[period - 1];
  const covered = coveredOf(model);
  if (rate == null) throw refuse(`Fit ${fitId} does not cover period ${period}; it covers period${covered.length === 1 ? '' : 's'} ${covered.join(', ')}.`);
  const covs = periodCovariates(data)[period - 1];
  let effects;
  try {
    effects = buildEffects(
      model.effects.map((e) => (e.covariate ? { id: e.id, covariate: e.covariate } : { id: e.id })),
      covs.values,
      covs.centring,
    );
  } catch (error) {
    throw refuse(`The fit's model does not fit this study's data any more: ${(error as Error).message.replace(/^effects: /, '')}`, 409);
  }
  const n = data.actors.length;
  const net = periodNetworks(data)[period - 1];
  const state = NetworkState.fromAdjacency(n, net.start);
  // Fixed pairs and absent actors (data/periods.ts) are never offered, as in the simulator.
  const allowed = net.free || net.active ? freePairMask(n, net.free ?? undefined, net.active ?? undefined) : undefined;
  const absent: number[] = [];
  if (net.active) for (let i = 0; i < n; i++) if (!net.active[i]) absent.push(i);
  const row = syncDb(dataSource).prepare(`SELECT "mode", "results" FROM "fits" WHERE "id" = ?`).get(fitId) as { mode: string; results: string | null } | undefined;
  const converged = row && row.mode === 'estimate' && row.results ? Boolean((JSON.parse(row.results) as { converged?: boolean }).converged) : null;
  return { fitId, period, data, model, rate, state, effects, params: model.effects.map((e) => e.value), converged, allowed, absent };
}

/** Pairs between present actors that are not offered (fixed in this period). */
function countFixed(n: number, allowed: Uint8Array, absent: number[]): number {
  const away = new Set(absent);
  let c = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && !away.has(i) && !away.has(j) && !allowed[i * n + j]) c++;
  return c;
}

const coveredOf = (model: BatchModel) => model.rates.map((r, k) => (r == null ? 0 : k + 1)).filter((p) => p > 0);

const effectsOf = (s: FitSetting): ExploreEffect[] => s.model.effects.map((e, k) => ({ key: s.effects[k].key, label: e.label, value: e.value }));

export async function choiceOf(dataSource: DataSource, studyId: number, fitId: number, period: number, actor: number): Promise<ChoiceResponse> {
  const s = await fitSetting(dataSource, studyId, fitId, period);
  const n = s.data.actors.length;
  if (actor >= n) throw refuse(`The study has ${plural(n, 'actor')}, numbered 0 to ${n - 1}; there is no actor ${actor}.`);
  if (s.absent.includes(actor)) {
    throw refuse(`${s.data.actors[actor]} is not present at both waves of period ${period}, so has no ministeps in it.`);
  }
  const { options } = explainChoice(s.state, actor, s.effects, s.params, s.allowed);
  const fixedLeftOut = n - 1 - (options.length - 1);
  const sorted = [...options].sort((a, b) => b.probability - a.probability || a.alter - b.alter);
  return {
    fitId,
    period,
    actor,
    actors: s.data.actors,
    effects: effectsOf(s),
    rate: s.rate,
    coveredPeriods: coveredOf(s.model),
    fixedLeftOut,
    options: sorted.map((o) => ({
      alter: o.alter < 0 ? null : o.alter,
      tie: o.tie ? 1 : 0,
      tieBack: o.alter >= 0 && s.state.adj[o.alter * n + actor] ? 1 : 0,
      probability: o.probability,
      utility: o.utility,
      contributions: o.contributions,
    })),
    converged: s.converged,
  };
}

export async function overviewOf(dataSource: DataSource, studyId: number, fitId: number, period: number, orderBy: string): Promise<OverviewResponse> {
  const s = await fitSetting(dataSource, studyId, fitId, period);
  const n = s.data.actors.length;
  const matrix = choiceMatrix(s.state, s.effects, s.params, s.allowed);
  const covNames = Object.keys(s.data.covariates).sort();
  let order: number[];
  if (orderBy === 'cluster') order = clusterOrder(s.state);
  else if (orderBy === 'index') order = Array.from({ length: n }, (_, i) => i);
  else {
    const name = orderBy.slice('covariate:'.length);
    const cov = s.data.covariates[name];
    if (!cov) throw refuse(`The study has no covariate "${name}"; it has ${covNames.length ? covNames.join(', ') : 'none'}.`);
    // The value at the start of the period; missing values last; ties in value by index.
    const column = cov.values[cov.changing ? Math.min(period - 1, cov.values.length - 1) : 0] as ArrayLike<number>;
    const key = (i: number) => {
      const v = column[i];
      return cov.kind === 'numeric' ? (Number.isNaN(v) ? Infinity : v) : v < 0 ? Infinity : v;
    };
    order = Array.from({ length: n }, (_, i) => i).sort((a, b) => key(a) - key(b) || a - b);
  }
  return {
    fitId,
    period,
    actors: s.data.actors,
    order,
    orderBy,
    orderChoices: [
      { value: 'cluster', label: 'similar ties together' },
      { value: 'index', label: 'as in the data' },
      ...covNames.map((c) => ({ value: `covariate:${c}`, label: `by ${c}` })),
    ],
    probabilities: Array.from({ length: n }, (_, i) => Array.from(matrix.subarray(i * n, (i + 1) * n))),
    startTies: edgesOf(n, s.state.adj),
    absent: s.absent,
    fixedPairs: s.allowed ? countFixed(n, s.allowed, s.absent) : 0,
    coveredPeriods: coveredOf(s.model),
    converged: s.converged,
  };
}

// ---------------------------------------------------------------- batches

/** Contexts of finished batches (their inputs never change once done). */
export class ContextCache {
  private readonly entries = new Map<number, Promise<BatchContext>>();
  constructor(private readonly limit = 8) {}
  get(dataSource: DataSource, batchId: number): Promise<BatchContext> {
    let hit = this.entries.get(batchId);
    if (!hit) {
      hit = loadBatchContext(dataSource, batchId);
      hit.catch(() => this.entries.delete(batchId));
      if (this.entries.size >= this.limit) this.entries.delete(this.entries.keys().next().value!);
      this.entries.set(batchId, hit);
    }
    return hit;
  }
}

function checkBatchReady(batch: LoadedBatch): void {
  if (batch.summary.state !== 'done') {
    throw refuse(`This batch is ${batch.summary.state}; chains can be replayed once it is done.`, 409);
  }
}

function periodIndexOf(batch: LoadedBatch, context: BatchContext, period: number): number {
  const index = context.periods.findIndex((p) => p.period === period);
  if (index < 0) {
    const ps = batch.summary.periods;
    throw refuse(`This batch simulated period${ps.length === 1 ? '' : 's'} ${ps.join(', ')}; there is no period ${period} in it.`);
  }
  return index;
}

function storedRow(dataSource: DataSource, batchId: number, period: number, chainIndex: number, width: number): Float64Array | null {
  const r = syncDb(dataSource)
    .prepare(`SELECT "firstChain", "data" FROM "batch_results" WHERE "batchId" = ? AND "period" = ? AND "firstChain" <= ? AND "firstChain" + "chains" > ?`)
    .get(batchId, period, chainIndex, chainIndex) as { firstChain: number; data: Buffer } | undefined;
  if (!r) return null;
  const block = float64FromBlob(r.data);
  const off = (chainIndex - r.firstChain) * width;
  return block.slice(off, off + width);
}

/** Seeded layout of the start and observed end ties together, so nodes do not jump while a chain plays. */
const layoutCache = new Map<string, Array<[number, number]>>();
export function replayLayout(key: string, n: number, start: Array<[number, number]>, end: Array<[number, number]>, seed: number): Array<[number, number]> {
  const hit = layoutCache.get(key);
  if (hit) return hit;
  const positions = seededLayout(n, [...start, ...end], seed);
  if (layoutCache.size > 32) layoutCache.delete(layoutCache.keys().next().value!);
  layoutCache.set(key, positions);
  return positions;
}

/** Re-simulates chain `chain` (numbered from 1) of a period of a finished batch, every ministep recorded. */
export function replayChain(dataSource: DataSource, batch: LoadedBatch, context: BatchContext, actors: string[], period: number, chain: number): ReplayResponse {
  checkBatchReady(batch);
  const p = periodIndexOf(batch, context, period);
  const chains = batch.row.chains;
  if (chain > chains) throw refuse(`This batch has ${plural(chains, 'chain')}, numbered 1 to ${chains}; there is no chain ${chain}.`);
  const per = context.periods[p];
  const n = context.n;
  const log = new MinistepLog();
  const row = new Float64Array(context.width);
  simulateChain(context, p, chain - 1, row, undefined, log.observer);
  const stored = storedRow(dataSource, batch.row.id, period, chain - 1, context.width);
  const matchesStored = stored !== null && stored.every((v, k) => v === row[k]);
  const cols = log.columns();
  const compare = new Uint8Array(n * n);
  for (let k = 0; k < n * n; k++) compare[k] = k % (n + 1) !== 0 && !(per.endMissing && per.endMissing[k]) ? 1 : 0;
  // Distance to the observed end over observed pairs, before and after the chain.
  const x = Uint8Array.from(per.start);
  let distanceStart = 0;
  for (let k = 0; k < n * n; k++) if (compare[k] && x[k] !== per.end[k]) distanceStart++;
  for (let s = 0; s < log.length; s++) if (cols.alters[s] >= 0) x[cols.actors[s] * n + cols.alters[s]] ^= 1;
  let distanceEnd = 0;
  for (let k = 0; k < n * n; k++) if (compare[k] && x[k] !== per.end[k]) distanceEnd++;
  const startTies = edgesOf(n, per.start);
  const observedEndTies = edgesOf(n, per.end, compare);
  let changes = 0;
  for (let s = 0; s < log.length; s++) if (cols.signs[s] !== 0) changes++;
  return {
    batchId: batch.row.id,
    period,
    chain,
    chains,
    actors,
    positions: replayLayout(`${batch.row.id}:${period}`, n, startTies, observedEndTies, deriveSeed(context.seed, 0x1b, period)),
    startTies,
    observedEndTies,
    unobservedEnd: per.endMissing ? edgesOf(n, per.endMissing) : [],
    steps: { t: Array.from(cols.times), actor: Array.from(cols.actors), alter: Array.from(cols.alters), sign: Array.from(cols.signs) },
    ministeps: log.length,
    changes,
    distanceStart,
    distanceEnd,
    matchesStored,
    rate: per.rate,
  };
}

/** Share of chains holding each chosen tie over the period's time, from the first `chains` chains re-simulated. */
export function timelinesOf(
  dataSource: DataSource,
  batch: LoadedBatch,
  context: BatchContext,
  actors: string[],
  query: { period: number; pairs: Array<[number, number]>; chains?: number; points?: number },
): TimelinesResponse {
  checkBatchReady(batch);
  const p = periodIndexOf(batch, context, query.period);
  const n = context.n;
  for (const [i, j] of query.pairs) {
    if (i >= n || j >= n) throw refuse(`Pair ${i}-${j}: the study has ${plural(n, 'actor')}, numbered 0 to ${n - 1}.`);
    if (i === j) throw refuse(`Pair ${i}-${j}: a tie joins two different actors.`);
  }
  const keys = new Set(query.pairs.map(([i, j]) => i * n + j));
  if (keys.size !== query.pairs.length) throw refuse('A pair is listed twice.');
  const batchChains = batch.row.chains;
  const chains = query.chains ?? batchChains;
  if (chains > batchChains) throw refuse(`This batch has ${plural(batchChains, 'chain')}; ${chains} cannot be re-simulated from it.`);
  const per = context.periods[p];
  const grid = evenGrid(query.points ?? DEFAULT_TIMELINE_POINTS);
  const tl = new TieTimelines(n, per.start, query.pairs, grid);
  const row = new Float64Array(context.width);
  for (let c = 0; c < chains; c++) {
    tl.beginChain();
    simulateChain(context, p, c, row, undefined, tl.observe);
    tl.endChain();
  }
  const counts = syncDb(dataSource)
    .prepare(`SELECT "networks", "counts" FROM "batch_tie_counts" WHERE "batchId" = ? AND "period" = ?`)
    .get(batch.row.id, query.period) as { networks: number; counts: Buffer } | undefined;
  const stored = counts ? int32FromBlob(counts.counts) : null;
  const shares = tl.shares();
  return {
    batchId: batch.row.id,
    period: query.period,
    chains,
    batchChains,
    grid,
    actors,
    pairs: query.pairs.map(([i, j], k) => ({
      from: i,
      to: j,
      observedStart: per.start[i * n + j] ? 1 : 0,
      observedEnd: per.endMissing && per.endMissing[i * n + j] ? null : per.end[i * n + j] ? 1 : 0,
      shares: shares[k],
      storedEndShare: stored && counts && counts.networks > 0 ? stored[i * n + j] / counts.networks : 0,
    })),
  };
}

export async function actorsOf(dataSource: DataSource, studyId: number, n: number): Promise<string[]> {
  const data = await loadStudyData(dataSource, studyId);
  if (data.actors.length !== n) throw refuse('The study data changed after this batch was run.', 409);
  return data.actors;
}
