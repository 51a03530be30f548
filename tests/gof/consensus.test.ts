/**
 * Consensus networks (METHODS.md section 6, our own device): tie frequencies, the threshold and top-L
 * consensus, and the comparison with the observed wave. The Jaccard index is checked against scipy
 * (scipy.spatial.distance.jaccard, Debian python3-scipy; Jaccard 1912); the counts against hand-worked
 * examples (definitions in METHODS.md 6, common practice for TP/FP/FN, precision and recall).
 */
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { compareNetworks, consensusAtThreshold, consensusTopL, persistenceJaccard, TieFrequencies } from '../../server/engine/consensus';
import { createRng } from '../../server/engine/prng';
import { runPython } from './python';

const net = (n: number, ties: [number, number][]) => {
  const a = new Uint8Array(n * n);
  for (const [i, j] of ties) a[i * n + j] = 1;
  return a;
};

describe('tie frequencies and consensus at a threshold', () => {
  const n = 3;
  const freq = new TieFrequencies(n);
  freq.add(net(n, [[0, 1], [1, 2]]));
  freq.add(net(n, [[0, 1], [2, 0]]));
  freq.add(net(n, [[0, 1], [1, 2]]));
  freq.add(net(n, [[1, 0]]));

  it('count ties per pair and networks (f_ij = count / N)', () => {
    expect(freq.networks).toBe(4);
    expect(freq.frequency(0, 1)).toBe(0.75);
    expect(freq.frequency(1, 2)).toBe(0.5);
    expect(freq.frequency(2, 0)).toBe(0.25);
    expect(freq.meanTies()).toBe(7 / 4);
  });

  it('keep pairs with f_ij >= tau (tau = 0.5 keeps a pair seen in exactly half)', () => {
    expect(Array.from(consensusAtThreshold(freq, 0.5))).toEqual(Array.from(net(n, [[0, 1], [1, 2]])));
    expect(Array.from(consensusAtThreshold(freq, 0.75))).toEqual(Array.from(net(n, [[0, 1]])));
    expect(Array.from(consensusAtThreshold(freq, 0.2))).toEqual(Array.from(net(n, [[0, 1], [1, 2], [2, 0], [1, 0]])));
  });

  it('respect the pair mask and refuse a bad threshold', () => {
    const mask = new Uint8Array(n * n).fill(1);
    mask[0 * n + 1] = 0;
    expect(Array.from(consensusAtThreshold(freq, 0.5, mask))).toEqual(Array.from(net(n, [[1, 2]])));
    expect(() => consensusAtThreshold(freq, 0)).toThrow(/threshold/);
    expect(() => consensusAtThreshold(freq, 1.2)).toThrow(/threshold/);
    expect(() => consensusAtThreshold(new TieFrequencies(2), 0.5)).toThrow(/no simulated/);
  });

  it('merge counts from several accumulators to the same totals as adding one by one', () => {
    const a = new TieFrequencies(n);
    const b = new TieFrequencies(n);
    a.add(net(n, [[0, 1], [1, 2]]));
    a.add(net(n, [[0, 1], [2, 0]]));
    b.add(net(n, [[0, 1], [1, 2]]));
    b.add(net(n, [[1, 0]]));
    a.merge(b);
    expect(Array.from(a.counts)).toEqual(Array.from(freq.counts));
    expect(a.networks).toBe(4);
    expect(a.tieTotal).toBe(freq.tieTotal);
  });
});

describe('top-L consensus', () => {
  const n = 4;
  const freq = new TieFrequencies(n);
  // pair (0,1) 3 times, (1,2) (2,3) (3,0) twice each, (0,2) once; mean ties = (3+6+1)/3 = 10/3 -> L = 3
  freq.add(net(n, [[0, 1], [1, 2], [2, 3], [0, 2]]));
  freq.add(net(n, [[0, 1], [3, 0], [1, 2]]));
  freq.add(net(n, [[0, 1], [2, 3], [3, 0]]));

  it('keeps L = round(mean simulated ties) pairs, highest counts first', () => {
    const c = consensusTopL(freq, 99);
    expect(c.reduce((s, v) => s + v, 0)).toBe(3);
    expect(c[0 * n + 1]).toBe(1);
    expect(c[0 * n + 2]).toBe(0);
  });

  it('breaks ties among equal counts by a seeded draw: same seed, same network; every seed picks from the tied pairs', () => {
    const first = Array.from(consensusTopL(freq, 7));
    expect(Array.from(consensusTopL(freq, 7))).toEqual(first);
    const chosen = new Set<string>();
    for (let seed = 0; seed < 40; seed++) {
      const c = consensusTopL(freq, seed);
      const picked = [[1, 2], [2, 3], [3, 0]].filter(([i, j]) => c[i * n + j]).map(([i, j]) => `${i}${j}`);
      expect(picked.length).toBe(2);
      chosen.add(picked.join(','));
    }
    expect(chosen.size).toBe(3); // all three ways of choosing 2 of the 3 tied pairs occur
  });
});

describe('comparison with the observed wave', () => {
  it('counts matched, extra and missed ties over the masked pairs (hand-worked example)', () => {
    const n = 3;
    const predicted = net(n, [[0, 1], [1, 2], [2, 0]]);
    const observed = net(n, [[0, 1], [1, 0], [2, 0]]);
    const r = compareNetworks(n, predicted, observed);
    // TP: (0,1), (2,0); FP: (1,2); FN: (1,0); TN: (0,2), (2,1)
    expect(r).toMatchObject({ pairs: 6, tp: 2, fp: 1, fn: 1, tn: 2 });
    expect(r.jaccard).toBeCloseTo(2 / 4, 14);
    expect(r.precision).toBeCloseTo(2 / 3, 14);
    expect(r.recall).toBeCloseTo(2 / 3, 14);
    const mask = new Uint8Array(9).fill(1);
    mask[1 * n + 2] = 0; // the extra tie's pair is not free
    const m = compareNetworks(n, predicted, observed, mask);
    expect(m).toMatchObject({ pairs: 5, tp: 2, fp: 0, fn: 1 });
    expect(m.precision).toBe(1);
  });

  it('reports null indices when undefined and refuses unmasked missing codes', () => {
    const r = compareNetworks(2, net(2, []), net(2, []));
    expect(r.jaccard).toBeNull();
    expect(r.precision).toBeNull();
    expect(r.recall).toBeNull();
    const withMissing = Uint8Array.of(0, 9, 0, 0);
    expect(() => compareNetworks(2, net(2, [[0, 1]]), withMissing)).toThrow(/mask it out/);
    expect(compareNetworks(2, net(2, [[0, 1]]), withMissing, Uint8Array.of(0, 0, 1, 0)).pairs).toBe(1);
  });

  it('gives the Jaccard index scipy gives, on random networks with masks', () => {
    const rng = createRng(3);
    const cases: { u: number[]; v: number[] }[] = [];
    const ours: (number | null)[] = [];
    for (let c = 0; c < 25; c++) {
      const n = 2 + rng.nextInt(12);
      const pu = rng.nextDouble() * 0.5;
      const a = new Uint8Array(n * n);
      const b = new Uint8Array(n * n);
      const mask = new Uint8Array(n * n);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          if (i === j) continue;
          a[i * n + j] = rng.nextDouble() < pu ? 1 : 0;
          b[i * n + j] = rng.nextDouble() < (c % 2 ? pu : 0.2) ? 1 : 0;
          mask[i * n + j] = rng.nextDouble() < 0.85 ? 1 : 0;
        }
      }
      const u: number[] = [];
      const v: number[] = [];
      for (let k = 0; k < n * n; k++) {
        if (mask[k] && k % (n + 1) !== 0) {
          u.push(a[k]);
          v.push(b[k]);
        }
      }
      cases.push({ u, v });
      ours.push(c % 3 === 0 ? persistenceJaccard(n, a, b, mask) : compareNetworks(n, a, b, mask).jaccard);
    }
    const ref = runPython<{ jaccard: (number | null)[] }>(join(__dirname, 'reference_jaccard.py'), { cases });
    ours.forEach((j, k) => {
      if (ref.jaccard[k] === null) expect(j).toBeNull();
      else expect(j).toBeCloseTo(ref.jaccard[k]!, 12);
    });
  });
});
