/**
 * Auxiliary statistics: one entry point that returns any statistic of shared/auxStatistics.ts as a
 * labelled vector.
 *
 * Purpose: the batch runner and the goodness-of-fit code store and compare these vectors; labels are
 * stable for a given network size and options, so vectors from different chains line up.
 *
 * References:
 * - Lospinoso, J. & Snijders, T.A.B. (2019). Goodness of fit for stochastic actor-oriented models.
 *   Methodological Innovations 12(3), 1-18.
 * - Wavefit METHODS.md section 5.
 */
import { AUX_STATISTIC_IDS, TRIAD_TYPES, type AuxStatisticId } from '../../../shared/auxStatistics';
import type { NetworkState } from '../state';
import { indegreeDistribution, outdegreeDistribution } from './degree';
import { dyadCensus } from './dyadCensus';
import { geodesicDistribution } from './geodesic';
import { triadCensus } from './triadCensus';

export { cumulativeDegreeCounts, indegreeDistribution, outdegreeDistribution } from './degree';
export { dyadCensus, type DyadCensus } from './dyadCensus';
export { distanceHistogram, geodesicDistribution, outLists, type GeodesicDistribution } from './geodesic';
export { CLASS_OF_CODE, triadCensus } from './triadCensus';

export interface AuxOptions {
  /** Largest degree k in the cumulative degree distributions. Default min(n - 1, 10), at least 0. */
  maxDegree?: number;
  /** Largest distance k in the geodesic distribution. Default min(n - 1, 6), at least 1. */
  maxDistance?: number;
}

export interface AuxValues {
  labels: string[];
  values: Float64Array;
}

export const DEFAULT_MAX_DEGREE = 10;
export const DEFAULT_MAX_DISTANCE = 6;

/** The options actually used for a network of n actors (defaults filled in). */
export function resolveAuxOptions(n: number, options: AuxOptions = {}): Required<AuxOptions> {
  return {
    maxDegree: options.maxDegree ?? Math.max(0, Math.min(n - 1, DEFAULT_MAX_DEGREE)),
    maxDistance: options.maxDistance ?? Math.max(1, Math.min(n - 1, DEFAULT_MAX_DISTANCE)),
  };
}

/** Labels of a statistic's components. Depend only on the id and the resolved options. */
export function auxLabels(id: AuxStatisticId, options: Required<AuxOptions>): string[] {
  switch (id) {
    case 'outdegree_distribution':
    case 'indegree_distribution':
      return Array.from({ length: options.maxDegree + 1 }, (_, k) => `<=${k}`);
    case 'triad_census':
      return [...TRIAD_TYPES];
    case 'dyad_census':
      return ['mutual', 'asymmetric', 'null', 'reciprocity'];
    case 'geodesic_distribution':
      return [...Array.from({ length: options.maxDistance }, (_, k) => `<=${k + 1}`), 'unreachable'];
    default:
      throw new Error(`aux-statistics: unknown statistic "${String(id)}" (known: ${AUX_STATISTIC_IDS.join(', ')})`);
  }
}

/**
 * One auxiliary statistic as a labelled vector:
 * - outdegree_distribution / indegree_distribution: #{i : degree <= k}, k = 0..maxDegree ("<=k");
 * - triad_census: the 16 counts in TRIAD_TYPES order;
 * - dyad_census: mutual, asymmetric, null, reciprocity (2M / L, 0 without ties);
 * - geodesic_distribution: #{(i, j) : d_ij <= k}, k = 1..maxDistance ("<=k"), then "unreachable".
 */
export function auxStatistic(id: AuxStatisticId, state: NetworkState, options: AuxOptions = {}): AuxValues {
  const opts = resolveAuxOptions(state.n, options);
  const labels = auxLabels(id, opts);
  let values: Float64Array;
  switch (id) {
    case 'outdegree_distribution':
      values = outdegreeDistribution(state, opts.maxDegree);
      break;
    case 'indegree_distribution':
      values = indegreeDistribution(state, opts.maxDegree);
      break;
    case 'triad_census':
      values = triadCensus(state);
      break;
    case 'dyad_census': {
      const d = dyadCensus(state);
      values = Float64Array.of(d.mutual, d.asymmetric, d.null, d.reciprocity);
      break;
    }
    case 'geodesic_distribution': {
      const g = geodesicDistribution(state, opts.maxDistance);
      values = new Float64Array(opts.maxDistance + 1);
      values.set(g.cumulative);
      values[opts.maxDistance] = g.unreachable;
      break;
    }
    default:
      throw new Error(`aux-statistics: unknown statistic "${String(id)}"`);
  }
  return { labels, values };
}

/** Every auxiliary statistic of shared/auxStatistics.ts, keyed by id. */
export function allAuxStatistics(state: NetworkState, options: AuxOptions = {}): Record<AuxStatisticId, AuxValues> {
  const out = {} as Record<AuxStatisticId, AuxValues>;
  for (const id of AUX_STATISTIC_IDS) out[id] = auxStatistic(id, state, options);
  return out;
}
