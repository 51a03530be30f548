/**
 * Basic effects: density (outdegree) and reciprocity.
 *
 * Purpose: change statistics and network totals for the two effects nearly every model contains.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics.
 *   Sociological Methodology 31, 361-395.
 * - Wavefit METHODS.md section 2.1: density delta = sigma, total L; reciprocity delta = sigma x_ji, total 2M.
 */
import type { NetworkState } from '../state';
import type { Effect } from './types';

export function densityEffect(): Effect {
  return {
    id: 'density',
    key: 'density',
    label: 'Density (outdegree)',
    kind: 'structural',
    needs: {},
    change(state: NetworkState, i: number, j: number): number {
      return 1 - 2 * state.adj[i * state.n + j];
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const n = state.n;
      const adj = state.adj;
      const row = i * n;
      const w2 = 2 * weight;
      for (let j = 0; j < n; j++) out[j] += weight - w2 * adj[row + j];
    },
    statistic(state: NetworkState): number {
      return state.ties;
    },
    kernel: { create: '1', remove: '-1' },
  };
}

export function reciprocityEffect(): Effect {
  return {
    id: 'reciprocity',
    key: 'reciprocity',
    label: 'Reciprocity',
    kind: 'structural',
    needs: {},
    change(state: NetworkState, i: number, j: number): number {
      const n = state.n;
      return (1 - 2 * state.adj[i * n + j]) * state.adj[j * n + i];
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const n = state.n;
      const adj = state.adj;
      const adjT = state.adjT;
      const row = i * n;
      for (let j = 0; j < n; j++) {
        // adjT[i*n+j] = x_ji
        if (adjT[row + j]) out[j] += weight * (1 - 2 * adj[row + j]);
      }
    },
    statistic(state: NetworkState): number {
      const { adj, adjT } = state;
      let s = 0;
      for (let k = 0; k < adj.length; k++) s += adj[k] & adjT[k];
      return s;
    },
    kernel: { pair: 'adjT[k]' },
  };
}
