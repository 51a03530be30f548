/**
 * Wave summaries and wave-to-wave change (server/data/summaries.ts):
 * - a small worked example computed by hand (density L / observed pairs, reciprocity index 2M/L,
 *   Wasserman & Faust 1994 ch. 4 and 13; Jaccard index stable / (stable + created + dissolved),
 *   Jaccard 1912; missing pairs left out, after Huisman & Steglich 2008);
 * - a seeded random example against networkx (density, overall_reciprocity) and Python set
 *   operations (created, dissolved, Jaccard), run by wave_reference.py with Debian's /usr/bin/python3.
 */
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createRng } from '../../server/engine/prng';
import { TIE_MISSING } from '../../server/data/parse';
import { compareWaves, summarizeCovariate, summarizeWave } from '../../server/data/summaries';

const M = TIE_MISSING;

describe('worked example, 4 actors a b c d', () => {
  // wave 1: a->b, b->a, b->c, c->d, d->a
  const w1 = Uint8Array.from([0, 1, 0, 0, 1, 0, 1, 0, 0, 0, 0, 1, 1, 0, 0, 0]);
  // wave 2: a->b, b->a, a->c, c->d, d->c; b->d not observed
  const w2 = Uint8Array.from([0, 1, 1, 0, 1, 0, 0, M, 0, 0, 0, 1, 0, 0, 1, 0]);
  // wave 3: b->c, c->a, d->b, a->d; a->b not observed
  const w3 = Uint8Array.from([0, M, 0, 1, 0, 0, 1, 0, 1, 0, 0, 0, 0, 1, 0, 0]);

  it('wave 1: L = 5 of 12 pairs, one mutual dyad: density 5/12, reciprocity 2/5', () => {
    expect(summarizeWave(1, 'one', 4, w1)).toEqual({ index: 1, label: 'one', actors: 4, ties: 5, density: 5 / 12, reciprocity: 2 / 5, missing: 0 });
  });

  it('wave 2: 11 observed pairs, two mutual dyads: density 5/11, reciprocity 4/5', () => {
    expect(summarizeWave(2, 'two', 4, w2)).toEqual({ index: 2, label: 'two', actors: 4, ties: 5, density: 5 / 11, reciprocity: 4 / 5, missing: 1 });
  });

  it('wave 3: 4 ties, none returned, every reverse observed: density 4/11, reciprocity 0', () => {
    // ties b->c, c->a, d->b, a->d; their reverses c->b, a->c, b->d, d->a are observed zeros
    const s = summarizeWave(3, 'three', 4, w3);
    expect(s).toMatchObject({ ties: 4, missing: 1, reciprocity: 0 });
    expect(s.density).toBeCloseTo(4 / 11, 15);
  });

  it('1 -> 2 over the 11 pairs observed in both: stable ab ba cd, created ac dc, dissolved bc da', () => {
    expect(compareWaves(1, 2, 4, w1, w2)).toEqual({
      from: 1, to: 2, created: 2, dissolved: 2, stable: 3, hamming: 4, jaccard: 3 / 7, caution: null,
    });
  });

  it('2 -> 3: no tie lasts, Jaccard 0, and a caution', () => {
    // pairs observed in both exclude b->d (missing in 2) and a->b (missing in 3)
    // wave 2 ties there: ba, ac, cd, dc; wave 3 ties: bc, ca, db, ad
    const change = compareWaves(2, 3, 4, w2, w3);
    expect(change).toMatchObject({ created: 4, dissolved: 4, stable: 0, hamming: 8, jaccard: 0 });
    expect(change.caution).toMatch(/Jaccard index 0\.00, below 0\.2/);
  });

  it('no change at all is flagged too; an empty pair of waves has no Jaccard index', () => {
    expect(compareWaves(1, 2, 4, w1, w1).caution).toMatch(/No tie changed/);
    const empty = new Uint8Array(16);
    expect(compareWaves(1, 2, 4, empty, empty).jaccard).toBeNull();
    expect(summarizeWave(1, 'e', 4, empty).reciprocity).toBeNull();
  });

  it('covariate summaries: counts, missing, min, max, mean', () => {
    const numeric = summarizeCovariate({ name: 'years', kind: 'numeric', changing: false, categories: [], values: [[3, 12, null, 7.5]] });
    expect(numeric.summaries).toEqual([{ kind: 'numeric', wave: null, observed: 3, missing: 1, min: 3, max: 12, mean: 22.5 / 3 }]);
    const cat = summarizeCovariate({ name: 'watch', kind: 'categorical', changing: true, categories: ['H', 'K'], values: [['H', 'K', 'H', null], ['K', 'K', null, null]] });
    expect(cat.summaries).toEqual([
      { kind: 'categorical', wave: 1, observed: 3, missing: 1, counts: { H: 2, K: 1 } },
      { kind: 'categorical', wave: 2, observed: 2, missing: 2, counts: { H: 0, K: 2 } },
    ]);
  });
});

describe('seeded random waves against networkx', () => {
  it('density and reciprocity match networkx; created, dissolved and Jaccard match set operations', () => {
    const n = 30;
    const rng = createRng(7_300);
    const waves: Uint8Array[] = [];
    let prev = new Uint8Array(n * n);
    for (let k = 0; k < 3; k++) {
      const next = new Uint8Array(n * n);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          if (i === j) continue;
          const keep = prev[i * n + j] === 1 && rng.nextDouble() < 0.6;
          const fresh = rng.nextDouble() < 0.08;
          const back = j < i && next[j * n + i] === 1 && rng.nextDouble() < 0.4; // some reciprocation
          next[i * n + j] = keep || fresh || back ? 1 : 0;
        }
      }
      waves.push(next);
      prev = next;
    }
    const tieLists = waves.map((w) => {
      const list: Array<[number, number]> = [];
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (w[i * n + j]) list.push([i, j]);
      return list;
    });
    const out = execFileSync('/usr/bin/python3', [join(__dirname, 'wave_reference.py')], {
      input: JSON.stringify({ n, waves: tieLists }),
      encoding: 'utf8',
    });
    const reference = JSON.parse(out) as {
      waves: Array<{ density: number; reciprocity: number | null }>;
      changes: Array<{ created: number; dissolved: number; stable: number; jaccard: number | null }>;
    };
    waves.forEach((w, k) => {
      const s = summarizeWave(k + 1, `w${k + 1}`, n, w);
      expect(s.density).toBeCloseTo(reference.waves[k].density, 12);
      expect(s.reciprocity).toBeCloseTo(reference.waves[k].reciprocity!, 12);
      expect(s.reciprocity).toBeGreaterThan(0.05); // the example does have mutual ties
    });
    for (let k = 0; k < 2; k++) {
      const c = compareWaves(k + 1, k + 2, n, waves[k], waves[k + 1]);
      const r = reference.changes[k];
      expect({ created: c.created, dissolved: c.dissolved, stable: c.stable }).toEqual({ created: r.created, dissolved: r.dissolved, stable: r.stable });
      expect(c.jaccard).toBeCloseTo(r.jaccard!, 12);
    }
  });
});
