/**
 * Triadic effects: transitive triplets, three-cycles and transitive ties.
 *
 * Purpose: change statistics (read from the cached two-path and shared-out counts) and network totals.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics.
 *   Sociological Methodology 31, 361-395.
 * - Snijders, T.A.B., van de Bunt, G.G. & Steglich, C.E.G. (2010). Introduction to stochastic
 *   actor-based models for network dynamics. Social Networks 32, 44-60.
 * - Wavefit METHODS.md section 2.1: transitive triplets delta = sigma (P2_ij + SO_ij), total
 *   sum_ij x_ij P2_ij; three-cycles delta = sigma P2_ji, total trace(X^3); transitive ties
 *   delta = sigma 1[P2_ij > 0] + sum over k with x_ik = x_jk = 1 of (create: 1[P2_ik = 0];
 *   delete: -1[P2_ik = 1]), total sum_ij x_ij 1[P2_ij > 0].
 */
import type { NetworkState } from '../state';
import type { Effect } from './types';

function needP2(state: NetworkState, id: string): Int32Array {
  if (state.p2 === null) throw new Error(`effects: ${id} needs a network state that keeps two-path counts`);
  return state.p2;
}

function needSO(state: NetworkState, id: string): Int32Array {
  if (state.so === null) throw new Error(`effects: ${id} needs a network state that keeps shared-out counts`);
  return state.so;
}

/** Row i of X X into `row` (length n), computed from the adjacency (no cache). */
function twoPathRow(state: NetworkState, i: number, row: Int32Array): void {
  const { n, adj } = state;
  row.fill(0);
  for (let h = 0; h < n; h++) {
    if (!adj[i * n + h]) continue;
    const hr = h * n;
    for (let j = 0; j < n; j++) row[j] += adj[hr + j];
  }
}

export function transitiveTripletsEffect(): Effect {
  return {
    id: 'transitive_triplets',
    key: 'transitive_triplets',
    label: 'Transitive triplets',
    kind: 'structural',
    needs: { twoPaths: true, sharedOut: true },
    change(state: NetworkState, i: number, j: number): number {
      const ij = i * state.n + j;
      const p2 = needP2(state, 'transitive_triplets');
      const so = needSO(state, 'transitive_triplets');
      return (1 - 2 * state.adj[ij]) * (p2[ij] + so[ij]);
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const n = state.n;
      const adj = state.adj;
      const p2 = needP2(state, 'transitive_triplets');
      const so = needSO(state, 'transitive_triplets');
      const row = i * n;
      for (let j = 0; j < n; j++) {
        const k = row + j;
        out[j] += weight * (1 - 2 * adj[k]) * (p2[k] + so[k]);
      }
    },
    kernel: { pair: 'p2[k] + so[k]' },
    statistic(state: NetworkState): number {
      const { n, adj, p2 } = state;
      let s = 0;
      if (p2 !== null) {
        for (let k = 0; k < adj.length; k++) if (adj[k]) s += p2[k];
        return s;
      }
      const row = new Int32Array(n);
      for (let i = 0; i < n; i++) {
        twoPathRow(state, i, row);
        for (let j = 0; j < n; j++) if (adj[i * n + j]) s += row[j];
      }
      return s;
    },
  };
}

export function threeCyclesEffect(): Effect {
  return {
    id: 'three_cycles',
    key: 'three_cycles',
    label: 'Three-cycles',
    kind: 'structural',
    needs: { twoPaths: true },
    change(state: NetworkState, i: number, j: number): number {
      const n = state.n;
      const p2 = needP2(state, 'three_cycles');
      return (1 - 2 * state.adj[i * n + j]) * p2[j * n + i];
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const n = state.n;
      const adj = state.adj;
      const p2 = needP2(state, 'three_cycles');
      const row = i * n;
      for (let j = 0; j < n; j++) {
        const c = p2[j * n + i];
        if (c !== 0) out[j] += weight * (1 - 2 * adj[row + j]) * c;
      }
    },
    kernel: { pair: 'p2[j * n + i]' },
    statistic(state: NetworkState): number {
      const { n, adj, p2 } = state;
      let s = 0;
      if (p2 !== null) {
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (adj[i * n + j]) s += p2[j * n + i];
        return s;
      }
      // trace(X^3) = sum_i sum_j P2_ij x_ji
      const row = new Int32Array(n);
      for (let i = 0; i < n; i++) {
        twoPathRow(state, i, row);
        for (let j = 0; j < n; j++) if (adj[j * n + i]) s += row[j];
      }
      return s;
    },
  };
}

export function transitiveTiesEffect(): Effect {
  // Scratch lists of ego i's out-neighbours k with P2_ik = 0 (k0) and with P2_ik = 1 (k1); grown on demand.
  let k0 = new Int32Array(0);
  let k1 = new Int32Array(0);
  return {
    id: 'transitive_ties',
    key: 'transitive_ties',
    label: 'Transitive ties',
    kind: 'structural',
    needs: { twoPaths: true },
    change(state: NetworkState, i: number, j: number): number {
      const { n, adj } = state;
      const p2 = needP2(state, 'transitive_ties');
      const x = adj[i * n + j];
      const s = 1 - 2 * x;
      let d = p2[i * n + j] > 0 ? s : 0;
      const want = x ? 1 : 0; // creating: k with P2_ik = 0 gain; deleting: k with P2_ik = 1 lose
      for (let k = 0; k < n; k++) {
        if (k === j || !adj[i * n + k] || !adj[j * n + k]) continue;
        if (p2[i * n + k] === want) d += s;
      }
      return d;
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const { n, adj } = state;
      const p2 = needP2(state, 'transitive_ties');
      if (k0.length < n) {
        k0 = new Int32Array(n);
        k1 = new Int32Array(n);
      }
      const row = i * n;
      let n0 = 0;
      let n1 = 0;
      for (let k = 0; k < n; k++) {
        if (!adj[row + k]) continue;
        const c = p2[row + k];
        if (c === 0) k0[n0++] = k;
        else if (c === 1) k1[n1++] = k;
      }
      for (let j = 0; j < n; j++) {
        const jr = j * n;
        if (adj[row + j]) {
          let d = p2[row + j] > 0 ? -1 : 0;
          for (let t = 0; t < n1; t++) d -= adj[jr + k1[t]]; // x_jj = 0 excludes k = j
          if (d !== 0) out[j] += weight * d;
        } else {
          let d = p2[row + j] > 0 ? 1 : 0;
          for (let t = 0; t < n0; t++) d += adj[jr + k0[t]];
          if (d !== 0) out[j] += weight * d;
        }
      }
    },
    statistic(state: NetworkState): number {
      const { n, adj, p2 } = state;
      let s = 0;
      if (p2 !== null) {
        for (let k = 0; k < adj.length; k++) if (adj[k] && p2[k] > 0) s++;
        return s;
      }
      const row = new Int32Array(n);
      for (let i = 0; i < n; i++) {
        twoPathRow(state, i, row);
        for (let j = 0; j < n; j++) if (adj[i * n + j] && row[j] > 0) s++;
      }
      return s;
    },
  };
}
