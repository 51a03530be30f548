/**
 * The Robbins-Monro estimator's behaviour on problems with known answers, and its failure modes.
 *
 * - A linear moment problem Z = A theta + b + e with Gaussian noise has its root at A^-1 (z - b) and,
 *   by the delta method, cov(theta-hat) = A^-1 Sigma A^-T exactly (Snijders 2001, The statistical
 *   evaluation of social network dynamics, Sociological Methodology 31: cov = D^-1 Sigma D^-T); the
 *   convergence ratios are then small (common practice thresholds |t| < 0.1, tau_max < 0.25).
 * - The same seed gives the same estimates; another seed other ones (METHODS.md 3, seeded streams).
 * - A problem with no root diverges and is reported as a failure with a reason (METHODS.md 8.5-8.9);
 *   a runaway rate stops with a reason; cancellation stops at once.
 */
import { describe, expect, it } from 'vitest';
import { buildEffects } from '../../server/engine/effects';
import {
  EstimationCancelled,
  EstimationFailed,
  estimate,
  fitSaom,
  type MomentProblem,
} from '../../server/engine/estimate';
import { createRng, deriveSeed } from '../../server/engine/prng';

/** Standard normal by Box-Muller from the seeded stream. */
function normal(rng: ReturnType<typeof createRng>): number {
  const u = rng.nextDouble() || 1e-300;
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng.nextDouble());
}

function linearProblem(seed: number): { problem: MomentProblem; root: number[]; cov: number[][] } {
  // A and noise standard deviations chosen by hand; one rate-like coordinate.
  const A = [
    [3, 0.5, 0],
    [0.4, 2, -0.3],
    [0, 0.6, 1.5],
  ];
  const b = [1, 2, -1];
  const sd = [1.2, 0.8, 1.0];
  const target = [10, 4, 2];
  // Root by hand (Cramer's rule is overkill; solve by elimination in the test with the known A).
  const root = solve3(A, target.map((t, k) => t - b[k]));
  const Ainv = invert3(A);
  const Sigma = sd.map((s, i) => sd.map((_, j) => (i === j ? s * s : 0)));
  const cov = mul(mul(Ainv, Sigma), transpose(Ainv));
  const problem: MomentProblem = {
    names: ['a', 'b', 'c'],
    kinds: ['rate', 'objective', 'objective'],
    target,
    periodsPerRun: 1,
    simulate(theta, phase, iteration) {
      const rng = createRng(deriveSeed(seed, phase, iteration));
      return A.map((row, k) => row.reduce((s, a, l) => s + a * theta[l], 0) + b[k] + sd[k] * normal(rng));
    },
  };
  return { problem, root, cov };
}

function transpose(m: number[][]): number[][] {
  return m[0].map((_, j) => m.map((row) => row[j]));
}
function mul(a: number[][], b: number[][]): number[][] {
  return a.map((row) => b[0].map((_, j) => row.reduce((s, v, k) => s + v * b[k][j], 0)));
}
function det3(m: number[][]): number {
  return (
    m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) -
    m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) +
    m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
  );
}
function invert3(m: number[][]): number[][] {
  const d = det3(m);
  const c = (i: number, j: number) => {
    const r = [0, 1, 2].filter((x) => x !== i);
    const k = [0, 1, 2].filter((x) => x !== j);
    return ((i + j) % 2 ? -1 : 1) * (m[r[0]][k[0]] * m[r[1]][k[1]] - m[r[0]][k[1]] * m[r[1]][k[0]]);
  };
  return [0, 1, 2].map((i) => [0, 1, 2].map((j) => c(j, i) / d));
}
function solve3(m: number[][], v: number[]): number[] {
  const inv = invert3(m);
  return inv.map((row) => row.reduce((s, a, k) => s + a * v[k], 0));
}

describe('a linear moment problem with a known root and covariance', () => {
  it('finds the root and the delta-method covariance', () => {
    const { problem, root, cov } = linearProblem(17);
    const result = estimate(problem, { start: [1, 0, 0], phase3Runs: 2000 });
    const se = cov.map((row, k) => Math.sqrt(row[k]));
    // The estimate is the root up to Robbins-Monro noise, a small part of the standard error.
    result.theta.forEach((t, k) => expect(Math.abs(t - root[k])).toBeLessThan(0.2 * se[k]));
    // Standard errors within 10% (Phase 3 with 2000 runs estimates Sigma to about 3%).
    result.standardErrors.forEach((s, k) => expect(Math.abs(s / se[k] - 1)).toBeLessThan(0.1));
    // The derivative matrix is A itself (finite differences of a linear map are exact).
    expect(result.derivative[0][0]).toBeCloseTo(3, 8);
    expect(result.derivative[1][2]).toBeCloseTo(-0.3, 8);
    expect(result.conditionNumber).toBeGreaterThan(1);
    for (const t of result.convergenceT) expect(Math.abs(t)).toBeLessThan(0.1);
    expect(result.tauMax).toBeLessThan(0.25);
  });

  it('reports progress through every phase and sub-phase', () => {
    const { problem } = linearProblem(3);
    const seen = new Set<string>();
    estimate(problem, { start: [1, 0, 0], phase3Runs: 50, onProgress: (p) => seen.add(`${p.phase}.${p.subphase}`) });
    expect([...seen].sort()).toEqual(['1.0', '2.1', '2.2', '2.3', '2.4', '3.0']);
  });
});

describe('reproducibility and failures on a network model', () => {
  const n = 12;
  const rng = createRng(5);
  const waves = [0, 1, 2].map(() => {
    const a = new Uint8Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && rng.nextDouble() < 0.2) a[i * n + j] = 1;
    return a;
  });
  // Make some ties mutual so reciprocity is estimable.
  for (const w of waves) for (let i = 0; i < n; i += 3) { w[i * n + ((i + 1) % n)] = 1; w[((i + 1) % n) * n + i] = 1; }
  const effects = buildEffects([{ id: 'density' }, { id: 'reciprocity' }]);
  const periods = [0, 1].map((m) => ({ start: waves[m], end: waves[m + 1], effects }));
  const input = (seed: number) => ({
    n,
    periods,
    rates: [{ estimate: true }, { estimate: true }],
    params: [{ estimate: true }, { estimate: true }],
    seed,
  });

  it('gives identical estimates for the same seed and different ones for another seed', () => {
    const a = fitSaom(input(42), { phase3Runs: 60 });
    const b = fitSaom(input(42), { phase3Runs: 60 });
    const c = fitSaom(input(43), { phase3Runs: 60 });
    expect(b.parameters.map((q) => q.value)).toEqual(a.parameters.map((q) => q.value));
    expect(b.parameters.map((q) => q.se)).toEqual(a.parameters.map((q) => q.se));
    expect(c.parameters.map((q) => q.value)).not.toEqual(a.parameters.map((q) => q.value));
    expect(a.simulatedPeriods).toBeGreaterThan(0);
  });

  it('stops at once when cancelled', () => {
    let calls = 0;
    expect(() => fitSaom(input(1), { shouldCancel: () => ++calls > 25 })).toThrow(EstimationCancelled);
    expect(calls).toBe(26);
  });

  it('fails with a reason when the moment equations have no root', () => {
    // Z = 10 tanh(theta) + noise can never reach 20: theta runs off (common practice: report, do not store).
    const problem: MomentProblem = {
      names: ['unreachable'],
      kinds: ['objective'],
      target: [20],
      periodsPerRun: 1,
      simulate: (theta, phase, iteration) => [10 * Math.tanh(theta[0]) + normal(createRng(deriveSeed(8, phase, iteration)))],
    };
    let error: unknown;
    try {
      estimate(problem, { start: [0] });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(EstimationFailed);
    expect((error as EstimationFailed).reason).toMatch(/"unreachable" reached .* diverged/);
  });

  it('fails with a reason when a rate runs away (more change than the model can produce)', () => {
    // All objective parameters fixed at 0: E[C] < n(n-1)/2 for every rate, but 80% of the pairs change.
    const m = 8;
    const empty = new Uint8Array(m * m);
    const full = new Uint8Array(m * m);
    let flips = 0;
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) if (i !== j && flips < 45) { full[i * m + j] = 1; flips++; }
    const fx = buildEffects([{ id: 'density' }]);
    let error: unknown;
    try {
      fitSaom(
        { n: m, periods: [{ start: empty, end: full, effects: fx }], rates: [{ estimate: true }], params: [{ estimate: false, value: 0 }], seed: 1, maxExpectedMinisteps: 20_000 },
        {},
      );
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(EstimationFailed);
    expect((error as EstimationFailed).reason).toMatch(/running away/);
  });
});
