/**
 * The Phase 2 rules of the Robbins-Monro estimator against their published definition, and the
 * automatic continuation rounds.
 *
 * Published definition (Snijders, T.A.B. 2001, The statistical evaluation of social network dynamics,
 * Sociological Methodology 31, 361-395, the section on the stochastic approximation algorithm; the
 * constants are as recalled in METHODS.md 4.3, tagged there as from memory):
 * - sub-phase k = 1..4 has gain a_k = a_1 2^-(k-1), a_1 = 0.2;
 * - it runs at least N_k- = 2^(4(k-1)/3) (7 + p) and at most N_k+ = N_k- + 200 iterations;
 * - after N_k- it ends as soon as, for every coordinate, the sum over the sub-phase of the products of
 *   successive deviations (Z_N - z_obs)(Z_N-1 - z_obs) is negative;
 * - each iteration is theta_N+1 = theta_N - a_k D0^-1 (Z_N - z_obs), D0 = diag of the Phase 1 derivative;
 * - at the end of a sub-phase theta is set to the average of the theta_N of that sub-phase.
 * The expected lengths below are worked by hand: 2^(4/3) = 2.519842, 2^(8/3) = 6.349604, 2^4 = 16.
 */
import { describe, expect, it } from 'vitest';
import { estimate, subphaseEnds, subphaseRule, type MomentProblem } from '../../server/engine/estimate';
import { createRng, deriveSeed } from '../../server/engine/prng';

function normal(rng: ReturnType<typeof createRng>): number {
  const u = rng.nextDouble() || 1e-300;
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng.nextDouble());
}

interface Call {
  theta: number[];
  phase: number;
  iteration: number;
  z: number[];
}

/**
 * Z = theta + noise * e with e standard normal, drawn from the (phase, iteration) stream only, so the
 * finite-difference derivative with common random numbers is exactly the identity and D0 = I.
 */
function recordingProblem(noise: number[], seed: number): { problem: MomentProblem; calls: Call[] } {
  const calls: Call[] = [];
  const p = noise.length;
  const problem: MomentProblem = {
    names: noise.map((_, k) => `x${k}`),
    kinds: noise.map(() => 'objective'),
    target: new Array<number>(p).fill(0),
    periodsPerRun: 1,
    simulate(theta, phase, iteration) {
      const rng = createRng(deriveSeed(seed, phase, iteration));
      const z = theta.map((t, k) => t + noise[k] * normal(rng));
      calls.push({ theta: theta.slice(), phase, iteration, z });
      return z;
    },
  };
  return { problem, calls };
}

/** Phase 2 calls split by sub-phase (Phase 2 runs are the only ones with phase key 2). */
function subphaseCalls(calls: Call[], lengths: number[]): Call[][] {
  const phase2 = calls.filter((c) => c.phase === 2);
  expect(phase2.length).toBe(lengths.reduce((s, v) => s + v, 0));
  const out: Call[][] = [];
  let at = 0;
  for (const len of lengths) {
    out.push(phase2.slice(at, at + len));
    at += len;
  }
  return out;
}

describe('Phase 2 sub-phase rules (Snijders 2001)', () => {
  it('has the published gains and lengths', () => {
    // p = 6 (two rates, four effects): 7 + p = 13.
    expect([1, 2, 3, 4].map((k) => subphaseRule(k, 6).minLength)).toEqual([13, 33, 83, 208]); // 13, 32.76, 82.54, 208
    expect([1, 2, 3, 4].map((k) => subphaseRule(k, 6).maxLength)).toEqual([213, 233, 283, 408]);
    expect([1, 2, 3, 4].map((k) => subphaseRule(k, 6).gain)).toEqual([0.2, 0.1, 0.05, 0.025]);
    // p = 3: 10, 25.2 -> 26, 63.5 -> 64, 160.
    expect([1, 2, 3, 4].map((k) => subphaseRule(k, 3).minLength)).toEqual([10, 26, 64, 160]);
    expect(() => subphaseRule(0, 3)).toThrow(/sub-phase/);
  });

  it('ends a sub-phase only after its minimum, when every coordinate oscillates, or at its maximum', () => {
    expect(subphaseEnds(12, 13, 213, [-1, -2])).toBe(false); // before the minimum
    expect(subphaseEnds(13, 13, 213, [-1, -2])).toBe(true);
    expect(subphaseEnds(50, 13, 213, [-1, 0])).toBe(false); // one coordinate not negative
    expect(subphaseEnds(50, 13, 213, [-1, 3])).toBe(false);
    expect(subphaseEnds(213, 13, 213, [5, 3])).toBe(true); // the maximum
  });

  it('follows the update, stopping and averaging rules in a run of the estimator', () => {
    // Coordinate 0 is pure noise (it oscillates around its root); coordinate 1 has little noise.
    const { problem, calls } = recordingProblem([1, 0.5], 11);
    const result = estimate(problem, { start: [0.5, -0.5], phase3Runs: 20 });
    const p = 2;
    const subs = subphaseCalls(calls, result.phase2Iterations);
    subs.forEach((sub, i) => {
      const k = i + 1;
      const { gain, minLength, maxLength } = subphaseRule(k, p);
      expect(sub.length).toBeGreaterThanOrEqual(minLength);
      expect(sub.length).toBeLessThanOrEqual(maxLength);
      // The update theta_N+1 = theta_N - a_k (Z_N - 0), D0 = I exactly.
      for (let s = 0; s + 1 < sub.length; s++) {
        for (let c = 0; c < p; c++) expect(sub[s + 1].theta[c]).toBeCloseTo(sub[s].theta[c] - gain * sub[s].z[c], 12);
      }
      // The stopping rule, recomputed from the recorded deviations: the sub-phase ends at the first
      // N >= N_k- where every product sum is negative, else at N_k+.
      const sums = new Array<number>(p).fill(0);
      let expected = maxLength;
      for (let s = 0; s < maxLength && s < sub.length; s++) {
        if (s > 0) for (let c = 0; c < p; c++) sums[c] += sub[s].z[c] * sub[s - 1].z[c];
        if (s + 1 >= minLength && sums.every((v) => v < 0)) {
          expected = s + 1;
          break;
        }
      }
      expect(sub.length).toBe(expected);
      // Averaging: the next sub-phase (or Phase 3) starts at the mean of this sub-phase's theta_N.
      const mean = [0, 1].map((c) => sub.reduce((sum, call) => sum + call.theta[c], 0) / sub.length);
      const nextStart = i + 1 < subs.length ? subs[i + 1][0].theta : calls.find((cl) => cl.phase === 3)!.theta;
      for (let c = 0; c < p; c++) expect(nextStart[c]).toBeCloseTo(mean[c], 12);
    });
    // With this much noise at least one sub-phase ended early (the rule is exercised, not only the cap).
    expect(subs.some((sub, i) => sub.length < subphaseRule(i + 1, p).maxLength)).toBe(true);
  });

  it('runs every sub-phase to its maximum when one coordinate never oscillates', () => {
    // Coordinate 1 is deterministic and starts far from its root without a Newton step: its deviation
    // shrinks by the factor (1 - a_k) each iteration and never changes sign, so its product sum stays
    // positive and no sub-phase may end early, however much coordinate 0 oscillates.
    const { problem } = recordingProblem([1, 0], 5);
    const result = estimate(problem, { start: [0, 30], newtonStep: false, phase3Runs: 20 });
    expect(result.phase2Iterations).toEqual([1, 2, 3, 4].map((k) => subphaseRule(k, 2).maxLength));
  });
});

describe('automatic continuation rounds', () => {
  it('continues from the estimates while a check misses the thresholds, up to the budget, and reports each round', () => {
    // A short Phase 2 (one sub-phase, no extra iterations) leaves the first estimates too rough for the
    // common-practice thresholds (|t| < 0.1, tau_max < 0.25) on a noisy problem.
    const { problem } = recordingProblem([3, 2, 1], 21);
    const short = { start: [2, -2, 1], subphases: 1, subphaseExtra: 0, phase3Runs: 800, newtonStep: false };
    const once = estimate(problem, { ...short, maxRounds: 1 });
    expect(once.rounds).toHaveLength(1);
    expect(once.rounds[0].converged).toBe(false);
    const more = estimate(problem, { ...short, maxRounds: 4 });
    expect(more.rounds.length).toBeGreaterThan(1);
    expect(more.rounds.length).toBeLessThanOrEqual(4);
    // Round 1 is the same fit as the single-round one; the reported result is the last round.
    expect(more.rounds[0].theta).toEqual(once.theta);
    expect(more.rounds.slice(0, -1).every((r) => !r.converged)).toBe(true);
    const last = more.rounds[more.rounds.length - 1];
    expect(more.theta).toEqual(last.theta);
    expect(more.tauMax).toBe(last.tauMax);
    // Here the root is 0 (Z = theta + noise, z_obs = 0); the Newton rounds bring the estimate within a
    // few Monte Carlo errors (sd / sqrt(800)) of it and the check then passes.
    expect(last.converged).toBe(true);
    more.theta.forEach((t, k) => expect(Math.abs(t)).toBeLessThan((4 * [3, 2, 1][k]) / Math.sqrt(800)));
  });
});
