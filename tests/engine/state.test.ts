/**
 * Checks of the network state (server/engine/state.ts): incremental caches against direct matrix products.
 */
import { describe, expect, it } from 'vitest';
import { NetworkState, NO_CACHES, subNetwork } from '../../server/engine/state';
import { createRng, randomNetwork } from './helpers';

/** X X and X X^T by the plain triple loop (definition of the matrix product). */
function products(n: number, adj: Uint8Array): { p2: Int32Array; so: Int32Array } {
  const p2 = new Int32Array(n * n);
  const so = new Int32Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let a = 0;
      let b = 0;
      for (let h = 0; h < n; h++) {
        a += adj[i * n + h] * adj[h * n + j];
        b += adj[i * n + h] * adj[j * n + h];
      }
      p2[i * n + j] = a;
      so[i * n + j] = b;
    }
  }
  return { p2, so };
}

/** The out- and in-neighbour lists hold exactly the row and column of the adjacency matrix. */
function expectListsMatch(state: NetworkState): void {
  const { n, adj } = state;
  for (let i = 0; i < n; i++) {
    const out = Array.from(state.outList.subarray(i * n, i * n + state.outdeg[i])).sort((a, b) => a - b);
    const inn = Array.from(state.inList.subarray(i * n, i * n + state.indeg[i])).sort((a, b) => a - b);
    const row: number[] = [];
    const col: number[] = [];
    for (let j = 0; j < n; j++) {
      if (adj[i * n + j]) row.push(j);
      if (adj[j * n + i]) col.push(j);
    }
    expect(out).toEqual(row);
    expect(inn).toEqual(col);
  }
}

describe('network state', () => {
  it('keeps degrees, transpose, two-path and shared-out counts equal to direct products under random toggles', () => {
    const rng = createRng(2024);
    for (const n of [2, 3, 7, 15]) {
      const state = randomNetwork(rng, n, 0.3);
      for (let step = 0; step < 300; step++) {
        const i = rng.nextInt(n);
        let j = rng.nextInt(n - 1);
        if (j >= i) j++;
        const before = state.adj[i * n + j];
        expect(state.toggle(i, j)).toBe(before ? -1 : 1);
      }
      const { p2, so } = products(n, state.adj);
      expect(Array.from(state.p2!)).toEqual(Array.from(p2));
      expect(Array.from(state.so!)).toEqual(Array.from(so));
      for (let i = 0; i < n; i++) {
        let out = 0;
        let inn = 0;
        for (let j = 0; j < n; j++) {
          out += state.adj[i * n + j];
          inn += state.adj[j * n + i];
          expect(state.adjT[j * n + i]).toBe(state.adj[i * n + j]);
        }
        expect(state.outdeg[i]).toBe(out);
        expect(state.indeg[i]).toBe(inn);
      }
      expect(state.ties).toBe(state.adj.reduce((a, b) => a + b, 0));
      expectListsMatch(state);
    }
  });

  it('keeps the neighbour lists equal to the rows and columns of the adjacency, from empty to complete and back', () => {
    const n = 6;
    const state = new NetworkState(n);
    const pairs: Array<[number, number]> = [];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j) pairs.push([i, j]);
    const rng = createRng(8);
    const order = pairs.map((p) => [rng.nextDouble(), p] as const).sort((a, b) => a[0] - b[0]).map(([, p]) => p);
    for (const [i, j] of order) state.toggle(i, j);
    expect(state.ties).toBe(n * (n - 1));
    expectListsMatch(state);
    for (const [i, j] of order.reverse()) {
      state.toggle(i, j);
      expectListsMatch(state);
    }
    expect(state.ties).toBe(0);
    expect(Array.from(state.p2!).every((v) => v === 0)).toBe(true);
  });

  it('copies and clones without sharing memory, and rebuilds caches a source lacks', () => {
    const rng = createRng(5);
    const a = randomNetwork(rng, 9, 0.4, NO_CACHES);
    const b = a.clone({ twoPaths: true, sharedOut: true });
    const { p2, so } = products(9, a.adj);
    expect(Array.from(b.p2!)).toEqual(Array.from(p2));
    expect(Array.from(b.so!)).toEqual(Array.from(so));
    b.toggle(0, 1);
    expect(a.adj[1]).not.toBe(b.adj[1]);
    const c = new NetworkState(9);
    c.copyFrom(b);
    expect(Array.from(c.adj)).toEqual(Array.from(b.adj));
    expect(Array.from(c.p2!)).toEqual(Array.from(b.p2!));
    expectListsMatch(c);
    c.toggle(2, 3);
    expectListsMatch(c);
    expectListsMatch(b);
    expect(() => new NetworkState(3).copyFrom(b)).toThrow(/network-state: cannot copy a network of 9 actors into one of 3/);
  });

  it('rejects bad adjacency input with a clear message', () => {
    expect(() => NetworkState.fromAdjacency(2, [0, 1, 1])).toThrow(/network-state: .* 4 entries, got 3/);
    expect(() => NetworkState.fromAdjacency(2, [0, 2, 0, 0])).toThrow(/network-state: entry \(0, 1\) must be 0 or 1/);
    expect(() => NetworkState.fromAdjacency(2, [1, 0, 0, 0])).toThrow(/network-state: self-tie at actor 0/);
    expect(() => NetworkState.fromEdges(3, [[0, 3]])).toThrow(/outside 0..2/);
    expect(() => new NetworkState(-1)).toThrow(/network-state:/);
    expect(() => new NetworkState(3).toggle(1, 1)).toThrow(/network-state: cannot toggle the self-tie/);
  });

  it('takes sub-networks of kept actors', () => {
    const s = NetworkState.fromEdges(4, [[0, 1], [1, 3], [3, 0], [2, 1]]);
    const sub = subNetwork(s, [1, 1, 0, 1]);
    expect(sub.n).toBe(3);
    expect(sub.edges()).toEqual([[0, 1], [1, 2], [2, 0]]);
  });
});
