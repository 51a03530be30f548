/**
 * Degree effects: indegree popularity and outdegree activity (both counting ego's own tie).
 *
 * Purpose: change statistics and network totals for the degree-based effects.
 *
 * References:
 * - Snijders, T.A.B., van de Bunt, G.G. & Steglich, C.E.G. (2010). Introduction to stochastic
 *   actor-based models for network dynamics. Social Networks 32, 44-60.
 * - Wavefit METHODS.md section 2.1: popularity s_i = sum_j x_ij x_+j, delta = sigma (d_in + 1),
 *   total sum_j x_+j^2; activity s_i = x_i+^2, delta = sigma (2 d_out + 1), total sum_i x_i+^2,
 *   where d_in = x_+j - x_ij and d_out = x_i+ - x_ij. This is the convention of shared/effects.ts.
 */
import type { NetworkState } from '../state';
import type { Effect } from './types';

export function indegreePopularityEffect(): Effect {
  return {
    id: 'indegree_popularity',
    key: 'indegree_popularity',
    label: 'Indegree popularity',
    kind: 'structural',
    needs: {},
    change(state: NetworkState, i: number, j: number): number {
      const x = state.adj[i * state.n + j];
      return (1 - 2 * x) * (state.indeg[j] - x + 1);
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const n = state.n;
      const adj = state.adj;
      const indeg = state.indeg;
      const row = i * n;
      for (let j = 0; j < n; j++) {
        const x = adj[row + j];
        out[j] += weight * (1 - 2 * x) * (indeg[j] - x + 1);
      }
    },
    statistic(state: NetworkState): number {
      let s = 0;
      for (let j = 0; j < state.n; j++) s += state.indeg[j] * state.indeg[j];
      return s;
    },
    // sigma (d_in + 1) with d_in = x_+j - x_ij equals sigma x_+j + (1 - x_ij).
    kernel: { create: '1', pair: 'indeg[j]' },
  };
}

export function outdegreeActivityEffect(): Effect {
  return {
    id: 'outdegree_activity',
    key: 'outdegree_activity',
    label: 'Outdegree activity',
    kind: 'structural',
    needs: {},
    change(state: NetworkState, i: number, j: number): number {
      const x = state.adj[i * state.n + j];
      return (1 - 2 * x) * (2 * (state.outdeg[i] - x) + 1);
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const n = state.n;
      const adj = state.adj;
      const row = i * n;
      // x = 0: +(2 d + 1); x = 1: -(2 (d - 1) + 1) = -(2 d - 1), with d = outdeg[i].
      const d = state.outdeg[i];
      const create = weight * (2 * d + 1);
      const remove = -weight * (2 * d - 1);
      for (let j = 0; j < n; j++) out[j] += adj[row + j] ? remove : create;
    },
    statistic(state: NetworkState): number {
      let s = 0;
      for (let i = 0; i < state.n; i++) s += state.outdeg[i] * state.outdeg[i];
      return s;
    },
    kernel: { pre: 'const $d = outdeg[i];', create: '2 * $d + 1', remove: '1 - 2 * $d' },
  };
}
