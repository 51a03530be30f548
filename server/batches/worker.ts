/**
 * Batch worker: simulates the chains of one chunk for every period of the batch and returns their
 * auxiliary statistic rows and tie counts. Chain c of period m always uses the stream
 * deriveSeed(batchSeed, c, m), so results do not depend on chunking or on the number of workers.
 *
 * References: METHODS.md section 3 (unconditional simulation from the observed start wave),
 * section 1.4 (end-wave overwrite of missing pairs), section 5 (auxiliary statistics).
 */
import { buildEffects, type Effect } from '../engine/effects';
import { createRng, deriveSeed } from '../engine/prng';
import { simulatePeriod, type MinistepObserver } from '../engine/simulate';
import { NetworkState } from '../engine/state';
import { auxStatistic } from '../engine/statistics';
import type { ChunkContext } from '../jobs/registry';
import type { BatchChunk, BatchChunkResult, BatchContext } from './context';

interface Prepared {
  effects: Effect[][];
  starts: NetworkState[];
}
const prepared = new WeakMap<BatchContext, Prepared>();

function prepare(context: BatchContext): Prepared {
  let p = prepared.get(context);
  if (!p) {
    const effects = context.periods.map((per) => buildEffects(context.effects, per.covariates, per.centring));
    const starts = context.periods.map((per) => NetworkState.fromAdjacency(context.n, per.start));
    p = { effects, starts };
    prepared.set(context, p);
  }
  return p;
}

/**
 * One chain of one period: simulate, overwrite missing end pairs, compute the statistics into `row`.
 * `observer` sees every ministep (server/explore replays a chain this way; it draws no random numbers).
 */
export function simulateChain(
  context: BatchContext,
  periodIndex: number,
  chain: number,
  row: Float64Array,
  counts?: Int32Array,
  observer?: MinistepObserver,
): number {
  const per = context.periods[periodIndex];
  const { effects, starts } = prepare(context);
  const rng = createRng(deriveSeed(context.seed, chain, per.period));
  const { end } = simulatePeriod({
    start: starts[periodIndex],
    rate: per.rate,
    effects: effects[periodIndex],
    params: context.params,
    rng,
    ...(per.free ? { free: per.free } : {}),
    ...(per.active ? { active: per.active } : {}),
    observer,
  });
  const n = context.n;
  if (counts) for (let k = 0; k < n * n; k++) counts[k] += end.adj[k];
  const ties = end.ties;
  if (per.endMissing) {
    const mask = per.endMissing;
    for (let k = 0; k < n * n; k++) {
      if (mask[k] && end.adj[k] !== per.end[k]) {
        const i = Math.floor(k / n);
        end.toggle(i, k - i * n);
      }
    }
  }
  const options = { maxDegree: context.maxDegree, maxDistance: context.maxDistance };
  let offset = 0;
  for (const id of context.statistics) {
    const { values } = auxStatistic(id, end, options);
    row.set(values, offset);
    offset += values.length;
  }
  if (offset !== context.width) throw new Error(`batch: a row has ${offset} components, expected ${context.width}`);
  return ties;
}

export function runChunk(context: BatchContext, chunk: BatchChunk, ctx?: ChunkContext): BatchChunkResult {
  const n = context.n;
  const periods = context.periods.map((per) => ({
    period: per.period,
    rows: new Float64Array(chunk.chains * context.width),
    counts: new Int32Array(n * n),
    tieTotal: 0,
  }));
  let done = 0;
  for (let c = 0; c < chunk.chains; c++) {
    const chain = chunk.firstChain + c;
    for (let p = 0; p < periods.length; p++) {
      const out = periods[p];
      const row = out.rows.subarray(c * context.width, (c + 1) * context.width);
      out.tieTotal += simulateChain(context, p, chain, row, out.counts);
      done++;
    }
    if (ctx && (c & 3) === 3) ctx.progress(done);
  }
  return { periods };
}
