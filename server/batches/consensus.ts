/**
 * The consensus network of a batch period (METHODS.md §6): the ties in at least a share of the
 * simulated end networks (or the L most frequent), set against the observed end wave, with the
 * persistence baseline beside it.
 */
import type { DataSource } from 'typeorm';
import type { ConsensusResponse } from '../../shared/batches';
import { TIE_MISSING } from '../data/parse';
import { loadStudyData } from '../data/store';
import { badRequest, conflict } from '../errors';
import { compareNetworks, consensusAtThreshold, consensusTopL, TieFrequencies } from '../engine/consensus';
import { deriveSeed } from '../engine/prng';
import { waveChange } from '../engine/waveChange';
import { syncDb } from '../jobs';
import { int32FromBlob } from './jobKind';
import { periodNetworks } from '../data/periods';
import type { LoadedBatch } from './service';

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
    if (!(threshold > 0 && threshold <= 1)) throw badRequest('The threshold is a share of chains: a number above 0 and at most 1 (e.g. 0.5).');
  }
  const row = syncDb(dataSource)
    .prepare(`SELECT "actors", "networks", "tieTotal", "counts" FROM "batch_tie_counts" WHERE "batchId" = ? AND "period" = ?`)
    .get(batch.row.id, period) as { actors: number; networks: number; tieTotal: number; counts: Buffer } | undefined;
  if (!row || row.networks === 0) throw conflict('batch_not_ready', 'No simulated networks are stored for this period.');
  const n = row.actors;
  const freq = new TieFrequencies(n, int32FromBlob(row.counts), row.networks, row.tieTotal);
  const data = await loadStudyData(dataSource, batch.row.studyId);
  if (data.actors.length !== n) throw conflict('batch_not_ready', 'The study data changed after this batch was run.');
  const net = periodNetworks(data)[period - 1];
  const consensus = top
    ? consensusTopL(freq, deriveSeed(batch.summary.seed, 0x70, period), net.compareMask)
    : consensusAtThreshold(freq, threshold, net.compareMask);
  const cmp = compareNetworks(n, consensus, net.end, net.compareMask);
  // Persistence: pairs observed in both waves.
  const persistence = waveChange(n, data.waves[period - 1], data.waves[period], { missing: TIE_MISSING }).jaccard;
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
