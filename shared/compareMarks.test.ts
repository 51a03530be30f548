/**
 * The comparison's marks and the sign-off concerns, as pure functions:
 * - the significance words use the two-sided normal quantiles 1.959964 and 2.575829 (common practice;
 *   checked against scipy.stats.norm.ppf from Debian's scipy);
 * - the Monte Carlo standard error of a p-value from N chains is sqrt(p(1 - p) / N), the binomial
 *   standard deviation over N (Davison & Hinkley 1997, Bootstrap Methods and their Application,
 *   section 4.2.5), with p kept 1/(N + 1) away from 0 and 1 (our choice, so an edge p-value shows an error);
 * - "better" only when the top p-value exceeds each other by more than 2 x sqrt(se_a^2 + se_b^2)
 *   (our stated rule: about a two-sided 95% margin for a difference of two independent estimates).
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { FEW_CHAINS } from './batches';
import { betterPValue, monteCarloSe, signoffConcerns, significanceOf, Z_1, Z_5 } from './review';

describe('significance of t = estimate / SE', () => {
  it('uses the normal quantiles (scipy)', () => {
    const r = spawnSync('/usr/bin/python3', ['-c', 'from scipy.stats import norm; print(norm.ppf(0.975), norm.ppf(0.995))'], { encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    const [q5, q1] = r.stdout.trim().split(/\s+/).map(Number);
    expect(Z_5).toBeCloseTo(q5, 5);
    expect(Z_1).toBeCloseTo(q1, 5);
    expect(significanceOf(1.95)).toBe('none');
    expect(significanceOf(-1.97)).toBe('p5');
    expect(significanceOf(2.6)).toBe('p1');
    expect(significanceOf(null)).toBeNull();
    expect(significanceOf(NaN)).toBeNull();
  });
});

describe('Monte Carlo error of a p-value and the "better" mark', () => {
  it('is the binomial standard deviation over N', () => {
    expect(monteCarloSe(0.5, 100)).toBeCloseTo(0.05, 12);
    expect(monteCarloSe(0.1, 1000)).toBeCloseTo(Math.sqrt(0.09 / 1000), 12);
    // At the edge p is kept 1/(N + 1) away from 0 and 1: no p-value claims a zero error.
    expect(monteCarloSe(0, 100)).toBeCloseTo(Math.sqrt((1 / 101) * (100 / 101) / 100), 12);
    expect(monteCarloSe(1, 100)).toBeCloseTo(monteCarloSe(0, 100), 12);
  });

  it('marks a p-value only beyond twice the combined error', () => {
    const cell = (p: number, n: number) => ({ pValue: p, mcSe: monteCarloSe(p, n) });
    // 0.30 vs 0.02 from 100 chains each: difference 0.28 > 2 * sqrt(0.046^2 + 0.014^2) = 0.096.
    expect(betterPValue([cell(0.02, 100), cell(0.3, 100)])).toEqual({ better: 1, difference: 'beyond' });
    // 0.30 vs 0.22: difference 0.08 < 2 * sqrt(0.046^2 + 0.041^2) = 0.123, so no mark.
    expect(betterPValue([cell(0.3, 100), cell(0.22, 100)])).toEqual({ better: null, difference: 'within' });
    // The same difference from 10,000 chains each is beyond the error (margin 0.0124).
    expect(betterPValue([cell(0.3, 10_000), cell(0.22, 10_000)])).toEqual({ better: 0, difference: 'beyond' });
    // With three models the top must beat every other one.
    expect(betterPValue([cell(0.4, 100), cell(0.35, 100), cell(0.01, 100)])).toEqual({ better: null, difference: 'within' });
    expect(betterPValue([cell(0.4, 100), null])).toEqual({ better: null, difference: null });
  });
});

describe('sign-off concerns', () => {
  it('names a non-converged fit and a batch with few chains, and nothing for a converged fit with enough chains', () => {
    expect(signoffConcerns({ converged: true, maxAbsT: 0.05, tauMax: 0.1, chains: 1000, fewChains: FEW_CHAINS })).toEqual([]);
    expect(signoffConcerns({ converged: null, maxAbsT: null, tauMax: null, chains: FEW_CHAINS, fewChains: FEW_CHAINS })).toEqual([]);
    const both = signoffConcerns({ converged: false, maxAbsT: 0.3, tauMax: 0.4, chains: 100, fewChains: FEW_CHAINS });
    expect(both.map((c) => c.code)).toEqual(['not_converged', 'few_chains']);
    expect(both[0].message).toContain('largest |t| 0.300, overall ratio 0.400');
    expect(both[1].message).toContain('1/101');
  });
});
