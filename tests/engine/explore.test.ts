/**
 * Checks of server/engine/explore.ts: exact choice probabilities, recorded replays and tie timelines.
 *
 * Sources:
 * - The ministep is a multinomial logit over "toggle i->j" (every j != i) and "no change" with utility
 *   sum_k beta_k delta_ijk, delta_ijk = s_ik(x with i->j toggled) - s_ik(x), "no change" utility 0:
 *   Snijders (2001), The statistical evaluation of social network dynamics, Sociological Methodology 31,
 *   361-395; the logit rule is McFadden (1974). The brute-force s_ik are the defining sums in
 *   ./egoStatistics.ts, not the engine's change statistics.
 * - The simulation scheme (exponential waiting time of total rate n * lambda, a uniformly chosen actor,
 *   then the choice by inverse CDF, three uniforms per ministep) is the one in METHODS.md section 3 and
 *   server/engine/README.md; the reference chain below is written here from that description.
 */
import { describe, expect, it } from 'vitest';
import { EFFECT_IDS, effectInfo, type EffectId } from '../../shared/effects';
import { buildEffects } from '../../server/engine/effects';
import { choiceMatrix, clusterOrder, evenGrid, explainChoice, recordPeriod, TieTimelines } from '../../server/engine/explore';
import { createRng } from '../../server/engine/prng';
import { simulatePeriod } from '../../server/engine/simulate';
import { NetworkState } from '../../server/engine/state';
import { egoStatistic, matrixOf, type Matrix } from './egoStatistics';
import { randomReciprocalNetwork } from './helpers';

function allSpecs(): { id: EffectId; covariate?: string }[] {
  return EFFECT_IDS.map((id) => {
    const need = effectInfo(id).covariate;
    return need === 'none' ? { id } : { id, covariate: need === 'numeric' ? 'age' : 'unit' };
  });
}

/** Brute-force utilities of every option of ego i (index i = "no change", utility 0). */
function bruteUtilities(ids: EffectId[], params: number[], x: Matrix, i: number, cov: { num: number[]; cat: number[] }): number[] {
  const n = x.length;
  const before = ids.map((id) => egoStatistic(id, x, i, cov));
  const u: number[] = [];
  for (let j = 0; j < n; j++) {
    if (j === i) {
      u.push(0);
      continue;
    }
    x[i][j] = 1 - x[i][j];
    let v = 0;
    ids.forEach((id, k) => (v += params[k] * (egoStatistic(id, x, i, cov) - before[k])));
    x[i][j] = 1 - x[i][j];
    u.push(v);
  }
  return u;
}

function softmax(u: number[]): number[] {
  const m = Math.max(...u);
  const e = u.map((v) => Math.exp(v - m));
  const s = e.reduce((a, b) => a + b, 0);
  return e.map((v) => v / s);
}

describe('explore: choice probabilities', () => {
  it('equal the softmax of sum_k beta_k delta_ijk computed by brute force, for every effect of the catalogue', () => {
    const rng = createRng(1401);
    let checked = 0;
    for (const n of [3, 5, 8]) {
      for (let rep = 0; rep < 4; rep++) {
        const state = randomReciprocalNetwork(rng, n, 0.3 + 0.1 * rep, 0.4);
        const num = Array.from({ length: n }, (_, k) => (k === 1 ? Number.NaN : Math.round(rng.nextDouble() * 40) / 4));
        num[0] = 1;
        num[n - 1] = 9;
        const cat = Array.from({ length: n }, () => (rng.nextDouble() < 0.15 ? -1 : rng.nextInt(3)));
        const cov = { num, cat };
        const specs = allSpecs();
        const effects = buildEffects(specs, { age: Float64Array.from(num), unit: Int32Array.from(cat) });
        const params = specs.map(() => Math.round((rng.nextDouble() * 3 - 1.5) * 100) / 100);
        const ids = specs.map((s) => s.id);
        const x = matrixOf(state);
        const matrix = choiceMatrix(state, effects, params);
        for (let i = 0; i < n; i++) {
          const { options } = explainChoice(state, i, effects, params);
          expect(options.length).toBe(n); // n - 1 alters and "no change"
          const u = bruteUtilities(ids, params, x, i, cov);
          const p = softmax(u);
          let total = 0;
          for (const o of options) {
            const j = o.alter < 0 ? i : o.alter;
            expect(o.utility).toBeCloseTo(u[j], 9);
            expect(o.probability).toBeCloseTo(p[j], 12);
            expect(matrix[i * n + j]).toBeCloseTo(p[j], 12);
            expect(o.contributions.reduce((a, b) => a + b, 0)).toBeCloseTo(o.utility, 12);
            expect(o.tie).toBe(o.alter < 0 ? 0 : x[i][o.alter]);
            // Each effect's part alone, by brute force.
            if (o.alter >= 0) {
              ids.forEach((id, k) => {
                const before = egoStatistic(id, x, i, cov);
                x[i][j] = 1 - x[i][j];
                const after = egoStatistic(id, x, i, cov);
                x[i][j] = 1 - x[i][j];
                expect(o.contributions[k]).toBeCloseTo(params[k] * (after - before), 9);
              });
            }
            total += o.probability;
            checked++;
          }
          expect(total).toBeCloseTo(1, 12);
        }
      }
    }
    expect(checked).toBeGreaterThan(150);
  });

  it('a hand example: density and reciprocity only (common practice: closed-form logit)', () => {
    // Actors 0, 1, 2; ties 1->0 only. Ego 0: toggling 0->1 adds density beta_d and reciprocity beta_r;
    // 0->2 adds beta_d; no change 0. With beta_d = -1, beta_r = 1.5:
    // weights e^{0.5}, e^{-1}, 1.
    const state = NetworkState.fromEdges(3, [[1, 0]]);
    const effects = buildEffects([{ id: 'density' }, { id: 'reciprocity' }]);
    const { options } = explainChoice(state, 0, effects, [-1, 1.5]);
    const w = [Math.exp(0.5), Math.exp(-1), 1];
    const s = w[0] + w[1] + w[2];
    expect(options.map((o) => o.alter)).toEqual([1, 2, -1]);
    options.forEach((o, k) => expect(o.probability).toBeCloseTo(w[k] / s, 14));
    expect(options[0].contributions).toEqual([-1, 1.5]);
    // The plain-words factor: reciprocity multiplies the odds of asking 1 (against any other option) by e^{1.5}.
    expect(Math.exp(options[0].contributions[1])).toBeCloseTo(4.4817, 4);
  });

  it('leaves out pairs that may not be offered and refuses an actor outside the network', () => {
    const state = NetworkState.fromEdges(3, []);
    const effects = buildEffects([{ id: 'density' }]);
    const allowed = Uint8Array.from([0, 1, 0, 1, 0, 1, 1, 1, 0]);
    const { options } = explainChoice(state, 0, effects, [0], allowed);
    expect(options.map((o) => o.alter)).toEqual([1, -1]);
    expect(options[0].probability).toBeCloseTo(0.5, 14);
    expect(() => explainChoice(state, 3, effects, [0])).toThrow(/actor 3 is outside 0..2/);
    expect(() => explainChoice(state, 0, effects, [0, 1])).toThrow(/1 effects but 2 parameters/);
  });
});

/**
 * A reference chain written from the scheme's description, with brute-force utilities: waiting time
 * -log(1 - u1) / (n lambda), actor floor(u2 n), choice the first option whose cumulative weight exceeds
 * u3 * total, in index order with "no change" at position i.
 */
function referenceChain(start: NetworkState, rate: number, ids: EffectId[], params: number[], seed: number, cov: { num: number[]; cat: number[] }) {
  const rng = createRng(seed);
  const x = matrixOf(start);
  const n = x.length;
  const steps: { t: number; actor: number; alter: number }[] = [];
  let t = 0;
  for (;;) {
    t -= Math.log(1 - rng.nextDouble()) / (n * rate);
    if (!(t < 1)) break;
    const i = Math.min(n - 1, Math.floor(rng.nextDouble() * n));
    const u3 = rng.nextDouble();
    const u = bruteUtilities(ids, params, x, i, cov);
    const m = Math.max(...u);
    const w = u.map((v) => Math.exp(v - m));
    const target = u3 * w.reduce((a, b) => a + b, 0);
    let acc = 0;
    let choice = n - 1;
    for (let j = 0; j < n; j++) {
      acc += w[j];
      if (target < acc) {
        choice = j;
        break;
      }
    }
    if (choice !== i) x[i][choice] = 1 - x[i][choice];
    steps.push({ t, actor: i, alter: choice === i ? -1 : choice });
  }
  return { steps, x };
}

describe('explore: recorded replay', () => {
  const n = 7;
  const num = [1, 4, 2, 8, Number.NaN, 5, 3];
  const cat = [0, 1, 0, 2, 1, 0, -1];
  const cov = { num, cat };
  const specs: { id: EffectId; covariate?: string }[] = [
    { id: 'density' },
    { id: 'reciprocity' },
    { id: 'transitive_triplets' },
    { id: 'covariate_alter', covariate: 'age' },
    { id: 'same_covariate', covariate: 'unit' },
  ];
  const params = [-1.6, 1.2, 0.3, 0.2, 0.7];
  const effects = buildEffects(specs, { age: Float64Array.from(num), unit: Int32Array.from(cat) });

  it('is the same chain ministep for ministep as a reference simulation written from the definitions', () => {
    const start = randomReciprocalNetwork(createRng(5), n, 0.3, 0.4);
    for (const seed of [11, 12, 13]) {
      const rec = recordPeriod({ start, rate: 3, effects, params, rng: createRng(seed) });
      const ref = referenceChain(start, 3, specs.map((s) => s.id), params, seed, cov);
      expect(rec.ministeps).toBe(ref.steps.length);
      expect(rec.ministeps).toBeGreaterThan(5);
      ref.steps.forEach((s, k) => {
        expect(rec.times[k]).toBe(s.t);
        expect(rec.actors[k]).toBe(s.actor);
        expect(rec.alters[k]).toBe(s.alter);
      });
      expect(matrixOf(rec.end)).toEqual(ref.x);
    }
  });

  it('recording changes nothing: same end, counts and random stream as a plain run; the steps rebuild the end', () => {
    const start = randomReciprocalNetwork(createRng(6), n, 0.25, 0.5);
    const rngA = createRng(99);
    const rngB = createRng(99);
    const plain = simulatePeriod({ start, rate: 4, effects, params, rng: rngA });
    const rec = recordPeriod({ start, rate: 4, effects, params, rng: rngB });
    expect(rec.ministeps).toBe(plain.ministeps);
    expect(rec.changes).toBe(plain.changes);
    expect(Array.from(rec.end.adj)).toEqual(Array.from(plain.end.adj));
    expect(rngA.nextUint32()).toBe(rngB.nextUint32());
    const x = start.clone();
    let changes = 0;
    for (let k = 0; k < rec.ministeps; k++) {
      if (k > 0) expect(rec.times[k]).toBeGreaterThan(rec.times[k - 1]);
      if (rec.alters[k] < 0) {
        expect(rec.signs[k]).toBe(0);
        continue;
      }
      const sign = x.toggle(rec.actors[k], rec.alters[k]);
      expect(rec.signs[k]).toBe(sign);
      changes++;
    }
    expect(changes).toBe(rec.changes);
    expect(Array.from(x.adj)).toEqual(Array.from(rec.end.adj));
  });
});

describe('explore: tie timelines', () => {
  it('start and end values are the shares of chains with the tie at t = 0 and at t = 1; values in between follow the steps', () => {
    const n = 6;
    const start = randomReciprocalNetwork(createRng(8), n, 0.3, 0.3);
    const effects = buildEffects([{ id: 'density' }, { id: 'reciprocity' }]);
    const pairs: [number, number][] = [];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j) pairs.push([i, j]);
    const grid = evenGrid(11);
    const tl = new TieTimelines(n, start.adj, pairs, grid);
    const ends = new Int32Array(n * n);
    const mid = new Int32Array(n * n);
    for (let c = 0; c < 40; c++) {
      const rec = recordPeriod({ start, rate: 3, effects, params: [-1, 1.5], rng: createRng(1000 + c) });
      tl.addRecorded(rec);
      for (let k = 0; k < n * n; k++) ends[k] += rec.end.adj[k];
      // The network at t = 0.5 by replaying the steps up to it.
      const x = start.clone();
      for (let s = 0; s < rec.ministeps && rec.times[s] <= 0.5; s++) if (rec.alters[s] >= 0) x.toggle(rec.actors[s], rec.alters[s]);
      for (let k = 0; k < n * n; k++) mid[k] += x.adj[k];
    }
    const shares = tl.shares();
    pairs.forEach(([i, j], p) => {
      expect(shares[p][0]).toBe(start.adj[i * n + j]);
      expect(tl.counts[p][grid.length - 1]).toBe(ends[i * n + j]);
      expect(tl.counts[p][5]).toBe(mid[i * n + j]);
    });
  });

  it('refuses bad pairs and grids', () => {
    const start = new Uint8Array(9);
    expect(() => new TieTimelines(3, start, [[0, 0]], [0, 1])).toThrow(/two different actors/);
    expect(() => new TieTimelines(3, start, [[0, 1], [0, 1]], [0, 1])).toThrow(/listed twice/);
    expect(() => new TieTimelines(3, start, [[0, 1]], [0.5, 0.2])).toThrow(/rise within/);
    expect(() => evenGrid(1)).toThrow(/at least 2 points/);
  });
});

describe('explore: actor order by clustering', () => {
  it('puts the members of two separate groups next to each other, whatever their numbering', () => {
    // Two complete groups {0, 2, 4, 6} and {1, 3, 5, 7}, interleaved by index.
    const edges: [number, number][] = [];
    for (let a = 0; a < 8; a++) for (let b = 0; b < 8; b++) if (a !== b && a % 2 === b % 2) edges.push([a, b]);
    const order = clusterOrder(NetworkState.fromEdges(8, edges));
    expect([...order].sort()).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
    const parity = order.map((a) => a % 2);
    expect(parity.slice(0, 4).every((p) => p === parity[0])).toBe(true);
    expect(parity.slice(4).every((p) => p !== parity[0])).toBe(true);
  });
});
