/**
 * The estimator on 3 actors against the exact law of the chain.
 *
 * Reference: tests/reference/chain_exact.py (written for the simulator's checks) builds the generator of
 * the actor-oriented model from its definition (Snijders 2001, The statistical evaluation of social
 * network dynamics, Sociological Methodology 31) with brute-force statistics and takes the law at t = 1
 * from scipy.linalg.expm (Debian python3-scipy). From it we take exact expectations E_theta[Z] of the
 * moment statistics (Hamming distance per period, network totals of each effect).
 *
 * Checks:
 * 1. The Phase 3 derivative matrix at beta = 0 (n = 3, rate 2, empty start) matches the exact
 *    dE[L(1)]/d beta_density = 1.278692 of METHODS.md 7a (a value verified there by matrix exponential
 *    and recomputed here by the reference), within Monte Carlo error plus the finite-difference bias,
 *    which the reference also gives exactly.
 * 2. After a full estimation of rates, density and reciprocity on four hand-made waves, the exact
 *    expectations at the estimates equal the observed statistics up to a small fraction of a standard
 *    deviation: the estimator found the root of the true moment equations (Snijders 2001).
 */
import { describe, expect, it } from 'vitest';
import type { EffectId } from '../../shared/effects';
import { buildEffects } from '../../server/engine/effects';
import { buildSaomProblem, fitSaom, sampleMoments } from '../../server/engine/estimate';
import { runReference } from '../engine/helpers';

interface ExactCase {
  n: number;
  rate: number;
  start: [number, number][];
  effects: { id: EffectId; param: number }[];
  derivatives?: boolean;
}
interface ExactResult {
  meanL: number;
  meanStats: number[];
  meanHamming: number;
  dMeanL_dBeta?: number[];
}
const exact = (cases: ExactCase[]) => runReference<{ results: ExactResult[] }>('chain_exact.py', { cases }).results;

function adjacency(n: number, edges: [number, number][]): Uint8Array {
  const a = new Uint8Array(n * n);
  for (const [i, j] of edges) a[i * n + j] = 1;
  return a;
}

describe('derivative matrix at beta = 0 against the exact chain (METHODS 7a)', () => {
  it('matches dE[L(1)]/d beta_density = 1.278692 within Monte Carlo error', () => {
    const n = 3;
    const effects = buildEffects([{ id: 'density' }]);
    const { problem } = buildSaomProblem({
      n,
      periods: [{ start: adjacency(n, []), end: adjacency(n, [[0, 1]]), effects }],
      rates: [{ estimate: false, value: 2 }],
      params: [{ estimate: true, value: 0 }],
      seed: 2024,
    });
    const runs = 6000;
    const s = sampleMoments(problem, [0], runs, { epsilon: 0.1 });
    const eps = 0.1;
    const [at0, atEps] = exact([
      { n, rate: 2, start: [], effects: [{ id: 'density', param: 0 }], derivatives: true },
      { n, rate: 2, start: [], effects: [{ id: 'density', param: eps }] },
    ]);
    // The reference reproduces METHODS 7a / 7c: E[L(1)] = 2.209209 and the derivative 1.278692.
    expect(at0.meanL).toBeCloseTo(2.209209, 5);
    expect(at0.dMeanL_dBeta![0]).toBeCloseTo(1.278692, 5);
    // What a forward difference with step 0.1 estimates, exactly; its distance from the derivative is the bias.
    const forward = (atEps.meanL - at0.meanL) / eps;
    expect(Math.abs(forward - 1.278692)).toBeLessThan(0.05);
    // The Monte Carlo estimate: within 4 standard errors of the exact forward quotient.
    expect(Math.abs(s.d[0][0] - forward)).toBeLessThan(4 * s.se[0][0]);
    // Informative: the Monte Carlo error is under 8% of the value.
    expect(s.se[0][0]).toBeLessThan(0.1);
    // And so within 4 SE + bias of the exact derivative of METHODS 7a.
    expect(Math.abs(s.d[0][0] - 1.278692)).toBeLessThan(4 * s.se[0][0] + Math.abs(forward - 1.278692));
  });

  it('matches the exact 3 x 3 derivative matrix of (C, L, 2M) in (rate, density, reciprocity)', () => {
    const n = 3;
    const effects = buildEffects([{ id: 'density' }, { id: 'reciprocity' }]);
    const start: [number, number][] = [[0, 1]];
    const { problem } = buildSaomProblem({
      n,
      periods: [{ start: adjacency(n, start), end: adjacency(n, [[0, 1], [1, 0]]), effects }],
      rates: [{ estimate: true }],
      params: [{ estimate: true }, { estimate: true }],
      seed: 77,
    });
    const theta = [2, -0.5, 1];
    const runs = 5000;
    const s = sampleMoments(problem, theta, runs, { epsilon: 0.1 });
    const base = { n, start, derivatives: false };
    const ef = (b1: number, b2: number) => [
      { id: 'density' as const, param: b1 },
      { id: 'reciprocity' as const, param: b2 },
    ];
    const [r0, rRate, rB1, rB2] = exact([
      { ...base, rate: 2, effects: ef(-0.5, 1) },
      { ...base, rate: 2.2, effects: ef(-0.5, 1) },
      { ...base, rate: 2, effects: ef(-0.4, 1) },
      { ...base, rate: 2, effects: ef(-0.5, 1.1) },
    ]);
    const z = (r: ExactResult) => [r.meanHamming, r.meanStats[0], r.meanStats[1]];
    const steps = [0.2, 0.1, 0.1];
    const shifted = [rRate, rB1, rB2];
    // Exact mean first: the simulated means agree with the exact ones.
    const sd = s.cov.map((row, k) => Math.sqrt(row[k]));
    z(r0).forEach((m, k) => expect(Math.abs(s.mean[k] - m)).toBeLessThan((4 * sd[k]) / Math.sqrt(runs)));
    for (let l = 0; l < 3; l++) {
      const col = z(shifted[l]).map((v, k) => (v - z(r0)[k]) / steps[l]);
      for (let k = 0; k < 3; k++) {
        expect(Math.abs(s.d[k][l] - col[k])).toBeLessThan(4 * s.se[k][l] + 1e-9);
      }
    }
  });
});

describe('estimates solve the exact moment equations (n = 3, three periods)', () => {
  it('gives exact expectations at the estimates within 0.25 SD of the observed statistics', () => {
    const n = 3;
    const waves: [number, number][][] = [
      [[0, 1]],
      [[0, 1], [1, 0], [1, 2]],
      [[1, 0], [1, 2], [2, 1]],
      [[1, 0], [2, 1], [0, 2], [2, 0]],
    ];
    const effects = buildEffects([{ id: 'density' }, { id: 'reciprocity' }]);
    const periods = [0, 1, 2].map((m) => ({ start: adjacency(n, waves[m]), end: adjacency(n, waves[m + 1]), effects }));
    const fit = fitSaom(
      { n, periods, rates: periods.map(() => ({ estimate: true })), params: [{ estimate: true }, { estimate: true }], seed: 9001 },
      { phase3Runs: 1000 },
    );
    const rates = fit.parameters.filter((q) => q.kind === 'rate').map((q) => q.value);
    const beta = fit.parameters.filter((q) => q.kind === 'objective').map((q) => q.value);
    const results = exact(
      periods.map((_, m) => ({
        n,
        rate: rates[m],
        start: waves[m],
        effects: [
          { id: 'density' as const, param: beta[0] },
          { id: 'reciprocity' as const, param: beta[1] },
        ],
      })),
    );
    const exactZ = [
      ...results.map((r) => r.meanHamming),
      results.reduce((s, r) => s + r.meanStats[0], 0),
      results.reduce((s, r) => s + r.meanStats[1], 0),
    ];
    // Observed: changes 2, 2, 3; ties 3 + 3 + 4 = 10; 2M = 2 + 2 + 2 = 6 (counted by hand).
    expect(fit.raw.target).toEqual([2, 2, 3, 10, 6]);
    const sd = fit.raw.statisticCovariance.map((row, k) => Math.sqrt(row[k]));
    const exactT = exactZ.map((m, k) => (m - fit.raw.target[k]) / sd[k]);
    for (const t of exactT) expect(Math.abs(t)).toBeLessThan(0.25);
    // The convergence diagnostics the estimator reports agree with that picture.
    expect(fit.tauMax).toBeLessThan(0.5);
  });
});
