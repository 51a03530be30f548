/**
 * The simulator against the exact law of the chain on 3 and 4 actors.
 *
 * Reference: tests/reference/chain_exact.py builds the generator matrix of the model from its definition
 * (Snijders 2001, The statistical evaluation of social network dynamics, Sociological Methodology 31) with
 * brute-force statistics, and takes the law at t = 1 from scipy.linalg.expm (Debian python3-scipy), or by
 * uniformisation for 4 actors. Its output is itself checked against the finite-time values of METHODS.md
 * 7a and 7c (derived there by matrix exponential [V]). Monte Carlo tolerances are 4 standard errors.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { EffectId } from '../../shared/effects';
import { buildEffects, type CovariateValues } from '../../server/engine/effects';
import { streamFor } from '../../server/engine/prng';
import { hamming, simulatePeriod, targetStatistics } from '../../server/engine/simulate';
import { NetworkState } from '../../server/engine/state';
import { runReference } from './helpers';

interface CaseEffect {
  id: EffectId;
  param: number;
  covariate?: (number | null)[];
  covName?: string;
  categorical?: boolean;
}
interface Case {
  name: string;
  n: number;
  rate: number;
  start: [number, number][];
  effects: CaseEffect[];
  method?: 'expm' | 'uniformisation';
  derivatives?: boolean;
  runs: number;
}
interface Exact {
  total: number;
  distL: number[];
  distM: number[];
  meanL: number;
  meanM: number;
  meanStats: number[];
  meanHamming: number;
  dMeanL_dBeta?: number[];
  dMeanL_dRate?: number;
}

const age = [1, null, 4];
const unit = [0, 0, 1];
const CASES: Case[] = [
  {
    name: 'density + reciprocity, METHODS 7a (n=3, beta=(-1,1), rate 2, empty start)',
    n: 3, rate: 2, start: [], runs: 40000, derivatives: true,
    effects: [{ id: 'density', param: -1 }, { id: 'reciprocity', param: 1 }],
  },
  {
    name: 'density + strong reciprocity from a two-path',
    n: 3, rate: 3, start: [[0, 1], [1, 2]], runs: 30000,
    effects: [{ id: 'density', param: -0.5 }, { id: 'reciprocity', param: 2 }],
  },
  {
    name: 'with transitive triplets, from a three-cycle',
    n: 3, rate: 2.5, start: [[0, 1], [1, 2], [2, 0]], runs: 30000,
    effects: [{ id: 'density', param: -1 }, { id: 'reciprocity', param: 0.5 }, { id: 'transitive_triplets', param: 0.6 }],
  },
  {
    name: 'every other effect, with a missing covariate value',
    n: 3, rate: 1.5, start: [[1, 0]], runs: 30000,
    effects: [
      { id: 'density', param: -0.8 },
      { id: 'three_cycles', param: -0.4 },
      { id: 'transitive_ties', param: 0.5 },
      { id: 'indegree_popularity', param: 0.2 },
      { id: 'outdegree_activity', param: -0.3 },
      { id: 'covariate_ego', param: 0.3, covariate: age, covName: 'age' },
      { id: 'covariate_alter', param: -0.4, covariate: age, covName: 'age' },
      { id: 'covariate_similarity', param: 0.8, covariate: age, covName: 'age' },
      { id: 'same_covariate', param: 0.5, covariate: unit, covName: 'unit', categorical: true },
    ],
  },
  {
    name: 'all parameters zero (METHODS 7c: n=3, rate 2, empty start)',
    n: 3, rate: 2, start: [], runs: 30000, derivatives: true,
    effects: [{ id: 'density', param: 0 }],
  },
  {
    name: 'four actors, METHODS 7a (beta=(-1.5,2.5), rate 3), by uniformisation',
    n: 4, rate: 3, start: [], runs: 20000, method: 'uniformisation',
    effects: [{ id: 'density', param: -1.5 }, { id: 'reciprocity', param: 2.5 }],
  },
];

function engineSetup(c: Case) {
  const covariates: Record<string, CovariateValues> = {};
  for (const e of c.effects) {
    if (!e.covariate || !e.covName) continue;
    covariates[e.covName] = e.categorical
      ? Int32Array.from(e.covariate, (v) => (v === null ? -1 : v))
      : Float64Array.from(e.covariate, (v) => (v === null ? Number.NaN : v));
  }
  const effects = buildEffects(
    c.effects.map((e) => (e.covName ? { id: e.id, covariate: e.covName } : { id: e.id })),
    covariates,
  );
  const params = Float64Array.from(c.effects, (e) => e.param);
  const start = NetworkState.fromEdges(c.n, c.start);
  return { effects, params, start };
}

interface MonteCarlo {
  L: Float64Array;
  M: Float64Array;
  stats: Float64Array[];
  hamming: Float64Array;
  scores: Float64Array[];
}

function runMonteCarlo(c: Case, caseIndex: number): MonteCarlo {
  const { effects, params, start } = engineSetup(c);
  const K = effects.length;
  const out: MonteCarlo = {
    L: new Float64Array(c.runs),
    M: new Float64Array(c.runs),
    stats: effects.map(() => new Float64Array(c.runs)),
    hamming: new Float64Array(c.runs),
    scores: Array.from({ length: K + 1 }, () => new Float64Array(c.runs)),
  };
  for (let r = 0; r < c.runs; r++) {
    const rng = streamFor(20240601, caseIndex, r);
    const res = simulatePeriod({ start, rate: c.rate, effects, params, rng, collectScores: c.derivatives });
    const end = res.end;
    out.L[r] = end.ties;
    let m = 0;
    for (let i = 0; i < c.n; i++) for (let j = i + 1; j < c.n; j++) m += end.adj[i * c.n + j] & end.adj[j * c.n + i];
    out.M[r] = m;
    const t = targetStatistics(end, effects);
    for (let k = 0; k < K; k++) out.stats[k][r] = t[k];
    out.hamming[r] = hamming(start, end);
    if (res.scores) for (let k = 0; k <= K; k++) out.scores[k][r] = res.scores[k];
  }
  return out;
}

function mean(xs: Float64Array): number {
  let s = 0;
  for (const x of xs) s += x;
  return s / xs.length;
}

function sd(xs: Float64Array): number {
  const m = mean(xs);
  let s = 0;
  for (const x of xs) s += (x - m) ** 2;
  return Math.sqrt(s / (xs.length - 1));
}

/** Empirical distribution of integer values 0..size-1. */
function histogram(xs: Float64Array, size: number): number[] {
  const h = new Array(size).fill(0);
  for (const x of xs) h[x]++;
  return h.map((c) => c / xs.length);
}

function expectDistribution(observed: number[], exact: number[], runs: number): void {
  expect(observed.length).toBe(exact.length);
  exact.forEach((p, k) => {
    const tol = 4 * Math.sqrt((p * (1 - p)) / runs) + 1e-12;
    expect(Math.abs(observed[k] - p), `cell ${k}: simulated ${observed[k]}, exact ${p}`).toBeLessThanOrEqual(tol);
  });
}

describe('simulator against the exact law of the chain', () => {
  let exact: Exact[];
  beforeAll(() => {
    const input = {
      cases: CASES.map((c) => ({
        n: c.n,
        rate: c.rate,
        start: c.start,
        method: c.method ?? 'expm',
        derivatives: c.derivatives ?? false,
        effects: c.effects.map((e) => ({ id: e.id, param: e.param, ...(e.covariate ? { covariate: e.covariate } : {}) })),
      })),
    };
    exact = runReference<{ results: Exact[] }>('chain_exact.py', input).results;
  });

  it('the reference script reproduces the finite-time values of METHODS.md 7a and 7c', () => {
    // METHODS 7a [V]: n=3, beta=(-1,1), lambda=2, empty start: E[L(1)] = 1.312224, E[M(1)] = 0.252778.
    expect(exact[0].meanL).toBeCloseTo(1.312224, 6);
    expect(exact[0].meanM).toBeCloseTo(0.252778, 6);
    // METHODS 7a [V]: derivative of E[L(1)] in beta_1 at beta = 0 (n=3, lambda=2, empty) = 1.278692.
    expect(exact[4].dMeanL_dBeta![0]).toBeCloseTo(1.278692, 5);
    // METHODS 7c: all beta = 0, n=3, lambda=2, empty start: E[L] = 2.209209, E[M] = 0.406717; also the
    // closed forms E[L] = n(n-1) q, E[M] = C(n,2) q^2 with q = (1 - exp(-2 lambda / n)) / 2.
    expect(exact[4].meanL).toBeCloseTo(2.209209, 6);
    expect(exact[4].meanM).toBeCloseTo(0.406717, 6);
    const q = (1 - Math.exp(-4 / 3)) / 2;
    expect(exact[4].meanL).toBeCloseTo(6 * q, 10);
    expect(exact[4].meanM).toBeCloseTo(3 * q * q, 10);
    // METHODS 7a [V]: n=4, beta=(-1.5,2.5), lambda=3: E[L(1)] = 2.581449, E[M(1)] = 0.838671.
    expect(exact[5].meanL).toBeCloseTo(2.581449, 6);
    expect(exact[5].meanM).toBeCloseTo(0.838671, 6);
    for (const e of exact) expect(e.total).toBeCloseTo(1, 10);
  });

  CASES.forEach((c, index) => {
    it(`distribution of ties, mutual dyads and every target statistic: ${c.name}`, () => {
      const mc = runMonteCarlo(c, index);
      const ex = exact[index];
      expectDistribution(histogram(mc.L, c.n * (c.n - 1) + 1), ex.distL, c.runs);
      expectDistribution(histogram(mc.M, (c.n * (c.n - 1)) / 2 + 1), ex.distM, c.runs);
      ex.meanStats.forEach((e, k) => {
        const tol = (4 * sd(mc.stats[k])) / Math.sqrt(c.runs) + 1e-12;
        expect(Math.abs(mean(mc.stats[k]) - e), `${c.effects[k].id}`).toBeLessThanOrEqual(tol);
      });
      expect(Math.abs(mean(mc.hamming) - ex.meanHamming)).toBeLessThanOrEqual((4 * sd(mc.hamming)) / Math.sqrt(c.runs));

      if (c.derivatives) {
        // Score-function derivative estimates (Schweinberger & Snijders 2007): dE[L]/dtheta = E[(L - EL) J].
        const L = mc.L;
        const mL = mean(L);
        const check = (J: Float64Array, target: number, what: string) => {
          const prod = Float64Array.from(L, (l, r) => (l - mL) * J[r]);
          const tol = (4 * sd(prod)) / Math.sqrt(c.runs);
          expect(Math.abs(mean(prod) - target), what).toBeLessThanOrEqual(tol);
          // The score has mean zero (METHODS 7b for the rate; a general property of scores).
          expect(Math.abs(mean(J)), `${what} score mean`).toBeLessThanOrEqual((4 * sd(J)) / Math.sqrt(c.runs));
        };
        check(mc.scores[0], ex.dMeanL_dRate!, 'dE[L]/d rate');
        ex.dMeanL_dBeta!.forEach((d, k) => check(mc.scores[k + 1], d, `dE[L]/d ${c.effects[k].id}`));
      }
    });
  });
});
