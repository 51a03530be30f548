/**
 * Parameter recovery: data simulated from known parameters (density -2, reciprocity 1.5, transitive
 * triplets 0.3, covariate similarity 1.0; rate 4; n = 35 actors, 3 waves) are fitted back by the method
 * of moments, and the true values fall inside the estimated 95% intervals estimate +- 1.96 SE for most
 * parameters (Snijders 2001, The statistical evaluation of social network dynamics, Sociological
 * Methodology 31: the method and its asymptotic normality). As in the product, a fit that misses the
 * common-practice convergence thresholds (|t| < 0.1, tau_max < 0.25) continues from its estimates
 * automatically, up to the round budget (METHODS.md 4.3).
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_ROUND_BUDGET, fitSaom, type SaomFit } from '../../server/engine/estimate';
import { simulatedPanel, TRUE_BETA } from './fixtures';

function fitUntilConverged(seed: number, dataSeed: number): { fit: SaomFit; rounds: number } {
  const { n, periods } = simulatedPanel(35, dataSeed);
  const input = {
    n,
    periods,
    rates: periods.map(() => ({ estimate: true })),
    params: TRUE_BETA.map(() => ({ estimate: true })),
    seed,
  };
  const fit = fitSaom(input, { phase3Runs: 1000, maxRounds: DEFAULT_ROUND_BUDGET });
  return { fit, rounds: fit.rounds };
}

describe('parameter recovery (n = 35, 3 waves, four effects)', () => {
  it('covers the true values with the 95% intervals for most parameters', () => {
    let covered = 0;
    let total = 0;
    for (const [seed, dataSeed] of [
      [101, 7],
      [202, 8],
    ]) {
      const { fit } = fitUntilConverged(seed, dataSeed);
      const objective = fit.parameters.filter((q) => q.kind === 'objective');
      objective.forEach((q, k) => {
        expect(q.se).not.toBeNull();
        total++;
        if (Math.abs(q.value - TRUE_BETA[k]) <= 1.96 * q.se!) covered++;
      });
      // Rates: each period was simulated at rate 4.
      for (const q of fit.parameters.filter((p) => p.kind === 'rate')) {
        expect(Math.abs(q.value - 4)).toBeLessThan(3 * q.se!);
      }
      expect(fit.tauMax).toBeLessThan(0.5);
    }
    // 8 intervals at 95%: all 8 covered has probability ~0.66, at least 6 ~0.99 (binomial).
    expect(covered).toBeGreaterThanOrEqual(6);
    expect(total).toBe(8);
  });
});
