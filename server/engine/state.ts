/**
 * Network state: a directed network on n actors as typed arrays, with degrees, neighbour lists and the
 * two-path and shared-out-neighbour counts kept up to date on every tie toggle.
 *
 * Purpose: the simulator toggles one tie per ministep; every change statistic then reads O(1) numbers.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics.
 *   Sociological Methodology 31, 361-395. (the quantities the effects need)
 * - Wavefit METHODS.md section 2.2 (our own O(n) update rules for P2 = X X and SO = X X^T).
 */

/** Which optional n*n caches a state keeps. Effects declare what they need (see effects/types.ts). */
export interface StateCaches {
  /** P2 = X X: p2[i*n+j] = #{h : i->h->j}. */
  twoPaths?: boolean;
  /** SO = X X^T: so[i*n+j] = #{h : i->h and j->h}; so[i*n+i] = outdeg[i]. */
  sharedOut?: boolean;
}

export const ALL_CACHES: Readonly<StateCaches> = Object.freeze({ twoPaths: true, sharedOut: true });
export const NO_CACHES: Readonly<StateCaches> = Object.freeze({ twoPaths: false, sharedOut: false });

export class NetworkState {
  /** Number of actors. */
  readonly n: number;
  /** Row-major adjacency: adj[i*n+j] = 1 when the tie i->j exists. The diagonal is always 0. */
  readonly adj: Uint8Array;
  /** The transpose, adjT[j*n+i] = adj[i*n+j], so columns can be read contiguously. */
  readonly adjT: Uint8Array;
  readonly outdeg: Int32Array;
  readonly indeg: Int32Array;
  /**
   * Out-neighbour lists: the out-neighbours of i are outList[i*n .. i*n + outdeg[i] - 1], in no particular
   * order. Uint16 entries suffice because n <= 46340. With inList, they let a toggle update the caches
   * in O(degree) instead of O(n).
   */
  readonly outList: Uint16Array;
  /** In-neighbour lists: the in-neighbours of j are inList[j*n .. j*n + indeg[j] - 1], in no particular order. */
  readonly inList: Uint16Array;
  /** Two-path counts X X, or null when not kept. */
  readonly p2: Int32Array | null;
  /** Shared-out-neighbour counts X X^T, or null when not kept. */
  readonly so: Int32Array | null;
  /** Number of ties L. */
  ties: number;

  /** An empty network. Use `fromAdjacency` or `fromEdges` for a given one. */
  constructor(n: number, caches: StateCaches = ALL_CACHES) {
    if (!Number.isInteger(n) || n < 0) {
      throw new Error(`network-state: the number of actors must be a non-negative integer, got ${String(n)}`);
    }
    if (n > 46340) throw new Error(`network-state: ${n} actors is more than this engine supports (46340)`);
    this.n = n;
    this.adj = new Uint8Array(n * n);
    this.adjT = new Uint8Array(n * n);
    this.outdeg = new Int32Array(n);
    this.indeg = new Int32Array(n);
    this.outList = new Uint16Array(n * n);
    this.inList = new Uint16Array(n * n);
    this.p2 = caches.twoPaths ? new Int32Array(n * n) : null;
    this.so = caches.sharedOut ? new Int32Array(n * n) : null;
    this.ties = 0;
  }

  /** Which caches this state keeps. */
  get caches(): StateCaches {
    return { twoPaths: this.p2 !== null, sharedOut: this.so !== null };
  }

  /**
   * A state from a row-major 0/1 adjacency matrix (copied). Throws on a wrong length, a value other than
   * 0 or 1, or a self-tie.
   */
  static fromAdjacency(n: number, adj: ArrayLike<number>, caches: StateCaches = ALL_CACHES): NetworkState {
    const state = new NetworkState(n, caches);
    if (adj.length !== n * n) {
      throw new Error(`network-state: an adjacency matrix for ${n} actors has ${n * n} entries, got ${adj.length}`);
    }
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const v = adj[i * n + j];
        if (v !== 0 && v !== 1) {
          throw new Error(`network-state: entry (${i}, ${j}) must be 0 or 1, got ${String(v)}`);
        }
        if (v === 1 && i === j) throw new Error(`network-state: self-tie at actor ${i} (the diagonal must be 0)`);
        state.adj[i * n + j] = v;
        state.adjT[j * n + i] = v;
      }
    }
    state.rebuild();
    return state;
  }

  /** A state from a list of ties [sender, receiver] (0-based). Duplicates are ignored; self-ties throw. */
  static fromEdges(n: number, edges: ReadonlyArray<readonly [number, number]>, caches: StateCaches = ALL_CACHES): NetworkState {
    const state = new NetworkState(n, caches);
    for (const [i, j] of edges) {
      if (!Number.isInteger(i) || !Number.isInteger(j) || i < 0 || j < 0 || i >= n || j >= n) {
        throw new Error(`network-state: tie (${String(i)}, ${String(j)}) is outside 0..${n - 1}`);
      }
      if (i === j) throw new Error(`network-state: self-tie at actor ${i}`);
      state.adj[i * n + j] = 1;
      state.adjT[j * n + i] = 1;
    }
    state.rebuild();
    return state;
  }

  /** Recompute degrees, neighbour lists, the tie count and the caches from the adjacency matrix (O(n L)). */
  rebuild(): void {
    const { n, adj, adjT, outdeg, indeg, outList, inList, p2, so } = this;
    outdeg.fill(0);
    indeg.fill(0);
    let ties = 0;
    for (let i = 0; i < n; i++) {
      const row = i * n;
      for (let j = 0; j < n; j++) {
        if (adj[row + j]) {
          outList[row + outdeg[i]++] = j;
          inList[j * n + indeg[j]++] = i;
          ties++;
        }
      }
    }
    this.ties = ties;
    if (p2) {
      p2.fill(0);
      for (let i = 0; i < n; i++) {
        const row = i * n;
        for (let h = 0; h < n; h++) {
          if (!adj[row + h]) continue;
          const hrow = h * n;
          for (let j = 0; j < n; j++) p2[row + j] += adj[hrow + j];
        }
      }
    }
    if (so) {
      so.fill(0);
      for (let i = 0; i < n; i++) {
        const row = i * n;
        for (let h = 0; h < n; h++) {
          if (!adj[row + h]) continue;
          const hrow = h * n;
          for (let j = 0; j < n; j++) so[row + j] += adjT[hrow + j];
        }
      }
    }
  }

  /** 1 when the tie i->j exists, else 0. */
  tie(i: number, j: number): number {
    return this.adj[i * this.n + j];
  }

  /**
   * Toggle the tie i->j (create it if absent, delete it if present) and update degrees, neighbour lists
   * and caches in O(degree) (METHODS.md 2.2). Returns the sign: +1 for a created tie, -1 for a deleted
   * one. i must differ from j; the simulator guarantees this, so the check is cheap and only guards
   * direct callers.
   */
  toggle(i: number, j: number): number {
    const n = this.n;
    if (i === j) throw new Error(`network-state: cannot toggle the self-tie (${i}, ${i})`);
    const adj = this.adj;
    const ij = i * n + j;
    const old = adj[ij];
    const s = old ? -1 : 1;
    const rowI = i * n;
    const rowJ = j * n;
    const outList = this.outList;
    const inList = this.inList;
    const outdeg = this.outdeg;
    const indeg = this.indeg;
    // The caches first, from the lists as they are before the toggle: outN(j) and inN(i) do not contain
    // the pair being toggled; inN(j) may contain i, which is skipped.
    const p2 = this.p2;
    if (p2 !== null) {
      // P2[i][b] += s for every b with j->b; P2[a][j] += s for every a with a->i.
      for (let t = rowJ, end = rowJ + outdeg[j]; t < end; t++) p2[rowI + outList[t]] += s;
      for (let t = rowI, end = rowI + indeg[i]; t < end; t++) p2[inList[t] * n + j] += s;
    }
    const so = this.so;
    if (so !== null) {
      // For b != i with b->j: SO[i][b] += s and SO[b][i] += s; SO[i][i] += s.
      for (let t = rowJ, end = rowJ + indeg[j]; t < end; t++) {
        const b = inList[t];
        if (b !== i) {
          so[rowI + b] += s;
          so[b * n + i] += s;
        }
      }
      so[rowI + i] += s;
    }
    adj[ij] = 1 - old;
    this.adjT[rowJ + i] = 1 - old;
    if (s > 0) {
      outList[rowI + outdeg[i]] = j;
      inList[rowJ + indeg[j]] = i;
    } else {
      removeFromList(outList, rowI, outdeg[i], j);
      removeFromList(inList, rowJ, indeg[j], i);
    }
    outdeg[i] += s;
    indeg[j] += s;
    this.ties += s;
    return s;
  }

  /** Overwrite this state with another of the same size. Caches this state keeps are copied or rebuilt. */
  copyFrom(other: NetworkState): void {
    if (other.n !== this.n) {
      throw new Error(`network-state: cannot copy a network of ${other.n} actors into one of ${this.n}`);
    }
    this.adj.set(other.adj);
    this.adjT.set(other.adjT);
    this.outdeg.set(other.outdeg);
    this.indeg.set(other.indeg);
    this.outList.set(other.outList);
    this.inList.set(other.inList);
    this.ties = other.ties;
    const needRebuild = (this.p2 !== null && other.p2 === null) || (this.so !== null && other.so === null);
    if (needRebuild) {
      this.rebuild();
      return;
    }
    if (this.p2 !== null && other.p2 !== null) this.p2.set(other.p2);
    if (this.so !== null && other.so !== null) this.so.set(other.so);
  }

  /** A deep copy, keeping the given caches (by default the same ones as this state). */
  clone(caches: StateCaches = this.caches): NetworkState {
    const copy = new NetworkState(this.n, caches);
    copy.copyFrom(this);
    return copy;
  }

  /** The ties as [sender, receiver] pairs, in row-major order. */
  edges(): Array<[number, number]> {
    const out: Array<[number, number]> = [];
    const { n, adj } = this;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (adj[i * n + j]) out.push([i, j]);
    return out;
  }
}

/** Remove `value` from the list list[start .. start + length - 1] (it must be there) by moving the last entry into its place. */
function removeFromList(list: Uint16Array, start: number, length: number, value: number): void {
  const last = start + length - 1;
  for (let t = start; t < last; t++) {
    if (list[t] === value) {
      list[t] = list[last];
      return;
    }
  }
}

/**
 * The sub-network on the actors with keep[i] = 1, in their original order (e.g. the active actors of a
 * period). Caches as requested.
 */
export function subNetwork(state: NetworkState, keep: ArrayLike<number>, caches: StateCaches = NO_CACHES): NetworkState {
  if (keep.length !== state.n) {
    throw new Error(`network-state: the actor mask has ${keep.length} entries for ${state.n} actors`);
  }
  const idx: number[] = [];
  for (let i = 0; i < state.n; i++) if (keep[i]) idx.push(i);
  const m = idx.length;
  const sub = new NetworkState(m, caches);
  const n = state.n;
  for (let a = 0; a < m; a++) {
    for (let b = 0; b < m; b++) {
      const v = state.adj[idx[a] * n + idx[b]];
      sub.adj[a * m + b] = v;
      sub.adjT[b * m + a] = v;
    }
  }
  sub.rebuild();
  return sub;
}
