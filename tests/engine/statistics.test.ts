/**
 * Checks of the auxiliary statistics (server/engine/statistics) against networkx (Debian python3-networkx,
 * via tests/reference/census_reference.py), brute force, graphology, and the worked examples of METHODS.md.
 */
import Graph from 'graphology';
import { singleSourceLength } from 'graphology-shortest-path/unweighted';
import { beforeAll, describe, expect, it } from 'vitest';
import { AUX_STATISTIC_IDS, TRIAD_TYPES } from '../../shared/auxStatistics';
import { NetworkState, NO_CACHES } from '../../server/engine/state';
import {
  allAuxStatistics,
  auxStatistic,
  CLASS_OF_CODE,
  distanceHistogram,
  dyadCensus,
  geodesicDistribution,
  indegreeDistribution,
  outdegreeDistribution,
  triadCensus,
} from '../../server/engine/statistics';
import { createRng, randomNetwork, randomReciprocalNetwork, runReference } from './helpers';

interface NxResult {
  triads: Record<string, number>;
  mutual: number;
  asymmetric: number;
  null: number;
  reciprocity: number | null;
  distances: Record<string, number>;
  unreachable: number;
  outdeg: number[];
  indeg: number[];
}

/** Brute-force triad census: classify every triple by its 6-arc code (classes from CLASS_OF_CODE are
 * checked separately against the class sizes of METHODS.md 5). */
function bruteTriads(s: NetworkState): number[] {
  const { n, adj } = s;
  const c = new Array(16).fill(0);
  for (let a = 0; a < n; a++) {
    for (let b = a + 1; b < n; b++) {
      for (let d = b + 1; d < n; d++) {
        const code =
          adj[a * n + b] | (adj[b * n + a] << 1) | (adj[a * n + d] << 2) | (adj[d * n + a] << 3) | (adj[b * n + d] << 4) | (adj[d * n + b] << 5);
        c[CLASS_OF_CODE[code]]++;
      }
    }
  }
  return c;
}

function graphsForCensus(): NetworkState[] {
  const rng = createRng(77);
  const out: NetworkState[] = [];
  out.push(new NetworkState(0, NO_CACHES), new NetworkState(1, NO_CACHES), new NetworkState(2, NO_CACHES));
  out.push(NetworkState.fromEdges(2, [[0, 1], [1, 0]], NO_CACHES));
  for (const n of [3, 5, 12, 30]) {
    out.push(new NetworkState(n, NO_CACHES)); // empty
    const full = new Uint8Array(n * n).fill(1);
    for (let i = 0; i < n; i++) full[i * n + i] = 0;
    out.push(NetworkState.fromAdjacency(n, full, NO_CACHES)); // complete
  }
  for (let k = 0; k < 48; k++) {
    const n = 3 + rng.nextInt(45);
    const p = [0.02, 0.05, 0.1, 0.2, 0.4, 0.7, 0.95][k % 7];
    out.push(k % 2 === 0 ? randomNetwork(rng, n, p, NO_CACHES) : randomReciprocalNetwork(rng, n, p, 0.5));
  }
  return out;
}

describe('auxiliary statistics against networkx', () => {
  const graphs = graphsForCensus();
  let nx: NxResult[];
  beforeAll(() => {
    // One Python call for the whole batch.
    nx = runReference<{ results: NxResult[] }>('census_reference.py', {
      graphs: graphs.map((g) => ({ n: g.n, edges: g.edges() })),
    }).results;
  });

  it(`triad census equals networkx triadic_census on ${graphs.length} graphs (empty and complete included)`, () => {
    expect(graphs.length).toBeGreaterThanOrEqual(50);
    graphs.forEach((g, k) => {
      const ours = triadCensus(g);
      const n = g.n;
      const total = n < 3 ? 0 : (n * (n - 1) * (n - 2)) / 6;
      expect(ours.reduce((a, b) => a + b, 0)).toBe(total);
      if (n >= 3) {
        expect(Array.from(ours), `graph ${k} (n=${n}, L=${g.ties})`).toEqual(TRIAD_TYPES.map((t) => nx[k].triads[t]));
      } else {
        expect(Array.from(ours)).toEqual(new Array(16).fill(0));
      }
    });
  });

  it('dyad census and reciprocity equal networkx (overall_reciprocity) and the identities of METHODS 7d', () => {
    graphs.forEach((g, k) => {
      const d = dyadCensus(g);
      expect([d.mutual, d.asymmetric, d.null]).toEqual([nx[k].mutual, nx[k].asymmetric, nx[k].null]);
      if (nx[k].reciprocity === null) expect(d.reciprocity).toBe(0);
      else expect(d.reciprocity).toBeCloseTo(nx[k].reciprocity!, 12);
      expect(d.mutual + d.asymmetric + d.null).toBe(g.n < 2 ? 0 : (g.n * (g.n - 1)) / 2);
      expect(2 * d.mutual + d.asymmetric).toBe(g.ties);
    });
  });

  it('geodesic distances equal networkx all_pairs_shortest_path_length', () => {
    graphs.forEach((g, k) => {
      const hist = distanceHistogram(g);
      const ours: Record<string, number> = {};
      hist.forEach((c, d) => {
        if (d >= 1 && c > 0) ours[String(d)] = c;
      });
      expect(ours).toEqual(nx[k].distances);
      const maxK = Math.max(1, g.n - 1);
      expect(geodesicDistribution(g, maxK).unreachable).toBe(nx[k].unreachable);
    });
  });

  it('degree distributions equal the cumulative counts of networkx degrees', () => {
    graphs.forEach((g, k) => {
      const maxK = 6;
      const cum = (deg: number[]) => Array.from({ length: maxK + 1 }, (_, t) => deg.filter((d) => d <= t).length);
      expect(Array.from(outdegreeDistribution(g, maxK))).toEqual(cum(nx[k].outdeg));
      expect(Array.from(indegreeDistribution(g, maxK))).toEqual(cum(nx[k].indeg));
    });
  });
});

describe('auxiliary statistics: worked examples and exact expectations', () => {
  // METHODS.md 7d worked example [V]: n = 5, edges 0->1, 1->0, 1->2, 2->3, 3->1, 0->3, 4->0.
  const example = NetworkState.fromEdges(5, [[0, 1], [1, 0], [1, 2], [2, 3], [3, 1], [0, 3], [4, 0]]);

  it('METHODS 7d: triad census, dyads, degrees and geodesics of the worked example', () => {
    const expected: Record<string, number> = { '012': 4, '021U': 1, '021C': 1, '111D': 1, '111U': 1, '030C': 1, '120C': 1 };
    expect(Array.from(triadCensus(example))).toEqual(TRIAD_TYPES.map((t) => expected[t] ?? 0));
    expect(dyadCensus(example)).toEqual({ mutual: 1, asymmetric: 5, null: 4, reciprocity: 2 / 7 });
    expect(Array.from(example.outdeg)).toEqual([2, 2, 1, 1, 1]);
    expect(Array.from(example.indeg)).toEqual([2, 2, 1, 2, 0]);
    // Geodesic counts over the 20 ordered pairs: d=1: 7, d=2: 7, d=3: 2, unreachable: 4.
    const g = geodesicDistribution(example, 4);
    expect(Array.from(g.cumulative)).toEqual([7, 14, 16, 16]);
    expect(g.unreachable).toBe(4);
  });

  it('the 64 labelled triads fall in the 16 classes with the sizes of METHODS 5 (Holland & Leinhardt 1970)', () => {
    const sizes = [1, 6, 3, 3, 3, 6, 6, 6, 6, 2, 3, 3, 3, 6, 6, 1];
    const counts = new Array(16).fill(0);
    for (let code = 0; code < 64; code++) counts[CLASS_OF_CODE[code]]++;
    expect(counts).toEqual(sizes);
  });

  it('the sub-quadratic census equals a brute-force triple loop on denser graphs', () => {
    const rng = createRng(5);
    for (let rep = 0; rep < 8; rep++) {
      const g = randomReciprocalNetwork(rng, 25, 0.15 * (rep + 1) * 0.7, 0.5);
      expect(Array.from(triadCensus(g))).toEqual(bruteTriads(g));
    }
  });

  it('METHODS 7e: the mean census of Bernoulli(0.2) digraphs on 10 actors matches C(n,3) size p^L (1-p)^(6-L)', () => {
    // Expected counts (Holland & Leinhardt 1976; Wasserman & Faust 1994 ch. 14), as tabulated in METHODS 7e:
    const table = [31.4573, 47.1859, 5.8982, 5.8982, 5.8982, 11.7965, 2.9491, 2.9491, 2.9491, 0.983, 0.3686, 0.3686, 0.3686, 0.7373, 0.1843, 0.0077];
    const sizes = [1, 6, 3, 3, 3, 6, 6, 6, 6, 2, 3, 3, 3, 6, 6, 1];
    const ties = [0, 1, 2, 2, 2, 2, 3, 3, 3, 3, 4, 4, 4, 4, 5, 6];
    const p = 0.2;
    const formula = sizes.map((s, k) => 120 * s * p ** ties[k] * (1 - p) ** (6 - ties[k]));
    formula.forEach((f, k) => expect(f).toBeCloseTo(table[k], 3));
    const rng = createRng(2001);
    const N = 3000;
    const sum = new Float64Array(16);
    const sumSq = new Float64Array(16);
    for (let r = 0; r < N; r++) {
      const c = triadCensus(randomNetwork(rng, 10, p, NO_CACHES));
      for (let k = 0; k < 16; k++) {
        sum[k] += c[k];
        sumSq[k] += c[k] * c[k];
      }
    }
    for (let k = 0; k < 16; k++) {
      const mean = sum[k] / N;
      const sd = Math.sqrt((sumSq[k] - N * mean * mean) / (N - 1));
      expect(Math.abs(mean - formula[k]), TRIAD_TYPES[k]).toBeLessThanOrEqual((4 * sd) / Math.sqrt(N) + 1e-9);
    }
  });

  it('geodesic distances agree with graphology-shortest-path (in-project cross-check)', () => {
    const rng = createRng(6);
    for (let rep = 0; rep < 6; rep++) {
      const s = randomNetwork(rng, 30, 0.04 + 0.03 * rep, NO_CACHES);
      const graph = new Graph({ type: 'directed' });
      for (let i = 0; i < s.n; i++) graph.addNode(String(i));
      for (const [i, j] of s.edges()) graph.addDirectedEdge(String(i), String(j));
      const hist = new Float64Array(s.n);
      for (let i = 0; i < s.n; i++) {
        const lengths = singleSourceLength(graph, String(i));
        for (const [node, d] of Object.entries(lengths)) if (node !== String(i)) hist[d]++;
      }
      expect(Array.from(distanceHistogram(s))).toEqual(Array.from(hist));
    }
  });
});

describe('auxStatistic: labelled vectors', () => {
  const s = NetworkState.fromEdges(5, [[0, 1], [1, 0], [1, 2], [2, 3], [3, 1], [0, 3], [4, 0]]);

  it('gives stable labels and the right values for every id', () => {
    const all = allAuxStatistics(s, { maxDegree: 3, maxDistance: 3 });
    expect(Object.keys(all)).toEqual([...AUX_STATISTIC_IDS]);
    expect(all.outdegree_distribution.labels).toEqual(['<=0', '<=1', '<=2', '<=3']);
    expect(Array.from(all.outdegree_distribution.values)).toEqual([0, 3, 5, 5]);
    expect(Array.from(all.indegree_distribution.values)).toEqual([1, 2, 5, 5]);
    expect(all.triad_census.labels).toEqual([...TRIAD_TYPES]);
    expect(all.dyad_census.labels).toEqual(['mutual', 'asymmetric', 'null', 'reciprocity']);
    expect(all.geodesic_distribution.labels).toEqual(['<=1', '<=2', '<=3', 'unreachable']);
    expect(Array.from(all.geodesic_distribution.values)).toEqual([7, 14, 16, 4]);
    for (const id of AUX_STATISTIC_IDS) expect(all[id].values.length).toBe(all[id].labels.length);
  });

  it('defaults depend only on the number of actors', () => {
    const a = auxStatistic('outdegree_distribution', s);
    expect(a.labels.length).toBe(5); // min(n - 1, 10) + 1
    const big = new NetworkState(40, NO_CACHES);
    expect(auxStatistic('geodesic_distribution', big).labels.length).toBe(7); // 6 distances + unreachable
    expect(Array.from(auxStatistic('geodesic_distribution', big).values)).toEqual([0, 0, 0, 0, 0, 0, 40 * 39]);
  });

  it('rejects bad options and unknown ids', () => {
    expect(() => auxStatistic('outdegree_distribution', s, { maxDegree: -1 })).toThrow(/degree-distribution: the largest degree must be an integer >= 0/);
    expect(() => auxStatistic('geodesic_distribution', s, { maxDistance: 0 })).toThrow(/geodesic-distribution: the largest distance must be an integer >= 1/);
    expect(() => auxStatistic('clustering' as never, s)).toThrow(/aux-statistics: unknown statistic "clustering"/);
  });
});
