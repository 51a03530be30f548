/**
 * Triad census: counts of the 16 isomorphism classes of directed triads.
 *
 * Purpose: auxiliary statistic, computed by the sub-quadratic algorithm of Batagelj & Mrvar, which only
 * visits triads that contain at least one tie and obtains the empty-triad count by subtraction.
 *
 * References:
 * - Batagelj, V. & Mrvar, A. (2001). A subquadratic triad census algorithm for large sparse networks
 *   with small maximum degree. Social Networks 23, 237-243.
 * - Holland, P.W. & Leinhardt, S. (1970). A method for detecting structure in sociometric data.
 *   American Journal of Sociology 76, 492-513. (the 16 classes and their M-A-N labels)
 * - Wasserman, S. & Faust, K. (1994). Social Network Analysis, ch. 14.
 * - Wavefit METHODS.md section 5 (one representative per class, checked there against networkx).
 */
import { TRIAD_TYPES } from '../../../shared/auxStatistics';
import type { NetworkState } from '../state';

// Arc bits of a triad on the vertices (a, b, c) = (0, 1, 2).
const ARC_BITS: ReadonlyArray<readonly [number, number, number]> = [
  [0, 1, 1], // a->b
  [1, 0, 2], // b->a
  [0, 2, 4], // a->c
  [2, 0, 8], // c->a
  [1, 2, 16], // b->c
  [2, 1, 32], // c->b
];

function bitOf(from: number, to: number): number {
  for (const [f, t, bit] of ARC_BITS) if (f === from && t === to) return bit;
  throw new Error('triad-census: internal error (no such arc)');
}

/** One representative per class (METHODS.md section 5 table; A, B, C = 0, 1, 2). */
const REPRESENTATIVES: Record<(typeof TRIAD_TYPES)[number], Array<[number, number]>> = {
  '003': [],
  '012': [[0, 1]],
  '102': [[0, 1], [1, 0]],
  '021D': [[1, 0], [1, 2]],
  '021U': [[0, 1], [2, 1]],
  '021C': [[0, 1], [1, 2]],
  '111D': [[0, 1], [1, 0], [2, 1]],
  '111U': [[0, 1], [1, 0], [1, 2]],
  '030T': [[0, 1], [2, 1], [0, 2]],
  '030C': [[1, 0], [2, 1], [0, 2]],
  '201': [[0, 1], [1, 0], [1, 2], [2, 1]],
  '120D': [[1, 0], [1, 2], [0, 2], [2, 0]],
  '120U': [[0, 1], [2, 1], [0, 2], [2, 0]],
  '120C': [[0, 1], [1, 2], [0, 2], [2, 0]],
  '210': [[0, 1], [1, 2], [2, 1], [0, 2], [2, 0]],
  '300': [[0, 1], [1, 0], [0, 2], [2, 0], [1, 2], [2, 1]],
};

const PERMUTATIONS: ReadonlyArray<readonly [number, number, number]> = [
  [0, 1, 2], [0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0],
];

function permuteCode(code: number, perm: readonly [number, number, number]): number {
  let out = 0;
  for (const [f, t, bit] of ARC_BITS) if (code & bit) out |= bitOf(perm[f], perm[t]);
  return out;
}

function canonical(code: number): number {
  let best = 64;
  for (const p of PERMUTATIONS) best = Math.min(best, permuteCode(code, p));
  return best;
}

/** CLASS_OF_CODE[code] = index into TRIAD_TYPES for each of the 64 labelled triads. */
export const CLASS_OF_CODE: Uint8Array = (() => {
  const byCanonical = new Map<number, number>();
  TRIAD_TYPES.forEach((type, index) => {
    let code = 0;
    for (const [f, t] of REPRESENTATIVES[type]) code |= bitOf(f, t);
    const c = canonical(code);
    if (byCanonical.has(c)) throw new Error(`triad-census: representatives of two classes are isomorphic (${type})`);
    byCanonical.set(c, index);
  });
  const table = new Uint8Array(64);
  for (let code = 0; code < 64; code++) {
    const index = byCanonical.get(canonical(code));
    if (index === undefined) throw new Error(`triad-census: labelled triad ${code} matches no class`);
    table[code] = index;
  }
  return table;
})();

/** Undirected neighbour lists (i ~ j when i->j or j->i), each sorted ascending. */
function neighbourLists(state: NetworkState): { start: Int32Array; list: Int32Array } {
  const { n, adj, adjT } = state;
  const start = new Int32Array(n + 1);
  let total = 0;
  for (let i = 0; i < n; i++) {
    const row = i * n;
    for (let j = 0; j < n; j++) if (adj[row + j] | adjT[row + j]) total++;
    start[i + 1] = total;
  }
  const list = new Int32Array(total);
  let p = 0;
  for (let i = 0; i < n; i++) {
    const row = i * n;
    for (let j = 0; j < n; j++) if (adj[row + j] | adjT[row + j]) list[p++] = j;
  }
  return { start, list };
}

/**
 * The triad census: 16 counts in the order of TRIAD_TYPES ('003', '012', ..., '300'). Cost
 * O(m * maxDegree) for m connected pairs plus O(n^2) to read the matrix.
 */
export function triadCensus(state: NetworkState): Float64Array {
  const { n, adj } = state;
  const census = new Float64Array(16);
  const { start, list } = neighbourLists(state);
  const inS = new Int32Array(n).fill(-1); // stamp for the union S of the current pair
  let stamp = 0;
  for (let v = 0; v < n; v++) {
    const vRow = v * n;
    for (let p = start[v]; p < start[v + 1]; p++) {
      const u = list[p];
      if (u <= v) continue;
      const uRow = u * n;
      stamp++;
      // Code bits for the pair (v, u): v->u = 1, u->v = 2.
      const pairCode = adj[vRow + u] | (adj[uRow + v] << 1);
      let sizeS = 0;
      // Neighbours of v other than u: all are adjacent to v, counted when w > u.
      for (let q = start[v]; q < start[v + 1]; q++) {
        const w = list[q];
        if (w === u) continue;
        inS[w] = stamp;
        sizeS++;
        if (w > u) {
          const wRow = w * n;
          const code = pairCode | (adj[vRow + w] << 2) | (adj[wRow + v] << 3) | (adj[uRow + w] << 4) | (adj[wRow + u] << 5);
          census[CLASS_OF_CODE[code]]++;
        }
      }
      // Neighbours of u not adjacent to v: counted when w > u, or v < w < u (w is not adjacent to v).
      for (let q = start[u]; q < start[u + 1]; q++) {
        const w = list[q];
        if (w === v || inS[w] === stamp) continue;
        sizeS++;
        if (w > v) {
          const wRow = w * n;
          const code = pairCode | (adj[uRow + w] << 4) | (adj[wRow + u] << 5);
          census[CLASS_OF_CODE[code]]++;
        }
      }
      census[pairCode === 3 ? 2 : 1] += n - sizeS - 2;
    }
  }
  let others = 0;
  for (let k = 1; k < 16; k++) others += census[k];
  census[0] = n < 3 ? 0 : (n * (n - 1) * (n - 2)) / 6 - others;
  return census;
}
