/**
 * Rates with every objective parameter fixed at 0 (density included): each ministep is then uniform
 * over the n options, every ordered pair flips by an independent Poisson(lambda / n) process, and the
 * method-of-moments rate has the closed form lambda-hat = -(n/2) ln(1 - 2c / (n(n-1))) (METHODS.md 7c,
 * our derivation, verified there by matrix exponential). Numbers quoted from METHODS.md 7c: n = 10,
 * c = 20 -> 2.938933; n = 10, lambda = 5 -> E[C] = 28.445425 and dE[C]/d lambda = 3.310915.
 */
import { describe, expect, it } from 'vitest';
import { buildEffects } from '../../server/engine/effects';
import { buildSaomProblem, closedFormRate, fitSaom, sampleMoments } from '../../server/engine/estimate';
import { createRng } from '../../server/engine/prng';

const expectedChange = (n: number, lambda: number) => (n * (n - 1) * (1 - Math.exp((-2 * lambda) / n))) / 2;

function randomWave(seed: number, n: number, p: number): Uint8Array {
  const rng = createRng(seed);
  const a = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && rng.nextDouble() < p) a[i * n + j] = 1;
  return a;
}

/** A copy of `wave` with exactly `flips` pairs toggled (seeded choice). */
function flip(wave: Uint8Array, n: number, flips: number, seed: number): Uint8Array {
  const rng = createRng(seed);
  const out = wave.slice();
  const pairs: number[] = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j) pairs.push(i * n + j);
  for (let k = 0; k < flips; k++) {
    const pick = k + rng.nextInt(pairs.length - k);
    [pairs[k], pairs[pick]] = [pairs[pick], pairs[k]];
    out[pairs[k]] ^= 1;
  }
  return out;
}

describe('closed-form rate (METHODS 7c)', () => {
  it('reproduces the quoted numbers', () => {
    expect(closedFormRate(20, 10, 90).rate).toBeCloseTo(2.938933, 6);
    // The closed form inverts E[C]: at the quoted E[C] = 28.445425 for lambda = 5 it gives back 5, and
    // its slope there is 1 / (dE[C]/d lambda) = 1 / 3.310915 (central difference of the project's function).
    expect(closedFormRate(28.445425, 10, 90).rate).toBeCloseTo(5, 5);
    const h = 1e-4;
    const slope = (closedFormRate(28.445425 + h, 10, 90).rate - closedFormRate(28.445425 - h, 10, 90).rate) / (2 * h);
    expect(slope).toBeCloseTo(1 / 3.310915, 6);
  });

  it('simulated E[C] and its finite-difference derivative match the closed form (n = 10, lambda = 5)', () => {
    const n = 10;
    const effects = buildEffects([{ id: 'density' }]);
    const start = randomWave(5, n, 0.2);
    const { problem } = buildSaomProblem({
      n,
      periods: [{ start, end: start, effects }],
      rates: [{ estimate: true }],
      params: [{ estimate: false, value: 0 }],
      seed: 99,
    });
    const runs = 3000;
    const s = sampleMoments(problem, [5], runs);
    const sd = Math.sqrt(s.cov[0][0]);
    expect(Math.abs(s.mean[0] - 28.445425)).toBeLessThan((4 * sd) / Math.sqrt(runs));
    // The forward difference with step 0.1 * lambda estimates (E[C](5.5) - E[C](5)) / 0.5 exactly.
    const forward = (expectedChange(n, 5.5) - expectedChange(n, 5)) / 0.5;
    expect(Math.abs(s.d[0][0] - forward)).toBeLessThan(4 * s.se[0][0]);
    // E[C] is concave in lambda, so the quotient lies between the derivatives at 5.5 and at 5 (= 3.310915).
    expect(forward).toBeGreaterThan(9 * Math.exp(-1.1));
    expect(forward).toBeLessThan(3.310915);
  });
});

describe('only rates estimated, every objective parameter fixed at 0', () => {
  it('recovers lambda-hat = -(n/2) ln(1 - 2c/(n(n-1))) in each period within its standard error', () => {
    const n = 20;
    const w1 = randomWave(1, n, 0.15);
    const w2 = flip(w1, n, 40, 2);
    const w3 = flip(w2, n, 90, 3);
    const effects = buildEffects([{ id: 'density' }, { id: 'reciprocity' }]);
    const periods = [
      { start: w1, end: w2, effects },
      { start: w2, end: w3, effects },
    ];
    // Start far from the answer, so the estimator has to find it.
    const fit = fitSaom(
      {
        n,
        periods,
        rates: [{ estimate: true, value: 8 }, { estimate: true, value: 1 }],
        params: [{ estimate: false, value: 0 }, { estimate: false, value: 0 }],
        seed: 314,
      },
      { phase3Runs: 500 },
    );
    const closed = [40, 90].map((c) => closedFormRate(c, n, n * (n - 1)).rate);
    const rates = fit.parameters.filter((q) => q.kind === 'rate');
    expect(rates).toHaveLength(2);
    rates.forEach((q, m) => {
      expect(q.se).not.toBeNull();
      expect(Math.abs(q.value - closed[m])).toBeLessThan(q.se!);
      // And well inside: the Robbins-Monro error is a small part of the statistical error.
      expect(Math.abs(q.value - closed[m]) / closed[m]).toBeLessThan(0.05);
    });
    // Fixed parameters stay exactly where they were put.
    expect(fit.parameters.filter((q) => q.kind === 'objective').map((q) => q.value)).toEqual([0, 0]);
  });
});
