/**
 * Degree distributions: cumulative outdegree and indegree counts.
 *
 * Purpose: auxiliary statistics F(k) = #{i : degree_i <= k}, k = 0..maxK, for goodness of fit.
 *
 * References:
 * - Lospinoso, J. & Snijders, T.A.B. (2019). Goodness of fit for stochastic actor-oriented models.
 *   Methodological Innovations 12(3), 1-18.
 * - Wavefit METHODS.md section 5.
 */
import type { NetworkState } from '../state';

function checkMaxK(maxK: number, what: string): void {
  if (!Number.isInteger(maxK) || maxK < 0) {
    throw new Error(`degree-distribution: the largest ${what} must be an integer >= 0, got ${String(maxK)}`);
  }
}

/** Cumulative counts of a degree vector: out[k] = #{i : deg[i] <= k}, k = 0..maxK. */
export function cumulativeDegreeCounts(deg: Int32Array, maxK: number): Float64Array {
  checkMaxK(maxK, 'degree');
  const out = new Float64Array(maxK + 1);
  for (let i = 0; i < deg.length; i++) if (deg[i] <= maxK) out[deg[i]]++;
  for (let k = 1; k <= maxK; k++) out[k] += out[k - 1];
  return out;
}

/** F(k) = #{i : outdegree_i <= k} for k = 0..maxK. */
export function outdegreeDistribution(state: NetworkState, maxK: number): Float64Array {
  return cumulativeDegreeCounts(state.outdeg, maxK);
}

/** F(k) = #{i : indegree_i <= k} for k = 0..maxK. */
export function indegreeDistribution(state: NetworkState, maxK: number): Float64Array {
  return cumulativeDegreeCounts(state.indeg, maxK);
}
