/**
 * Geodesic distance distribution: directed shortest-path lengths by breadth-first search.
 *
 * Purpose: auxiliary statistic G(k) = #{ordered pairs (i, j), i != j : d_ij <= k}, k = 1..maxK, plus the
 * number of ordered pairs with no path.
 *
 * References:
 * - Lospinoso, J. & Snijders, T.A.B. (2019). Goodness of fit for stochastic actor-oriented models.
 *   Methodological Innovations 12(3), 1-18.
 * - Moore, E.F. (1959). The shortest path through a maze. (breadth-first search)
 * - Wavefit METHODS.md section 5 (O(n (n + L))).
 */
import type { NetworkState } from '../state';

export interface GeodesicDistribution {
  /** cumulative[k - 1] = G(k) for k = 1..maxK. */
  cumulative: Float64Array;
  /** Ordered pairs with no directed path. */
  unreachable: number;
}

/** Out-neighbour lists in compressed form: targets of i are list[start[i] .. start[i+1]). */
export function outLists(state: NetworkState): { start: Int32Array; list: Int32Array } {
  const { n, adj, outdeg } = state;
  const start = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) start[i + 1] = start[i] + outdeg[i];
  const list = new Int32Array(start[n]);
  for (let i = 0; i < n; i++) {
    let p = start[i];
    const row = i * n;
    for (let j = 0; j < n; j++) if (adj[row + j]) list[p++] = j;
  }
  return { start, list };
}

/** Histogram of finite distances: hist[d] = #{(i, j) : d_ij = d}, d = 1..n-1; hist[0] unused. */
export function distanceHistogram(state: NetworkState): Float64Array {
  const n = state.n;
  const { start, list } = outLists(state);
  const hist = new Float64Array(Math.max(n, 1));
  const dist = new Int32Array(n);
  const queue = new Int32Array(n);
  for (let s = 0; s < n; s++) {
    dist.fill(-1);
    dist[s] = 0;
    let head = 0;
    let tail = 0;
    queue[tail++] = s;
    while (head < tail) {
      const v = queue[head++];
      const dv = dist[v] + 1;
      for (let p = start[v]; p < start[v + 1]; p++) {
        const w = list[p];
        if (dist[w] < 0) {
          dist[w] = dv;
          hist[dv]++;
          queue[tail++] = w;
        }
      }
    }
  }
  return hist;
}

export function geodesicDistribution(state: NetworkState, maxK: number): GeodesicDistribution {
  if (!Number.isInteger(maxK) || maxK < 1) {
    throw new Error(`geodesic-distribution: the largest distance must be an integer >= 1, got ${String(maxK)}`);
  }
  const n = state.n;
  const hist = distanceHistogram(state);
  let reachable = 0;
  for (let d = 1; d < hist.length; d++) reachable += hist[d];
  const cumulative = new Float64Array(maxK);
  let acc = 0;
  for (let k = 1; k <= maxK; k++) {
    if (k < hist.length) acc += hist[k];
    cumulative[k - 1] = acc;
  }
  return { cumulative, unreachable: n < 2 ? 0 : n * (n - 1) - reachable };
}
