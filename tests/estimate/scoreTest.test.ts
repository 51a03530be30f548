/**
 * Score-type tests of candidate effects (Schweinberger 2012, Statistical modelling of network panel
 * data: goodness of fit, British Journal of Mathematical and Statistical Psychology 65:263-281).
 * - The chi-square tail P(chi2_1 > x) against scipy.stats.chi2.sf (Debian's scipy).
 * - Calibration under the null: end waves simulated from a model without the candidate (density and
 *   reciprocity only), all from the same start wave; with the moments at the data-generating values and
 *   the correction for the estimated parameters (which stands for their linearised estimates), the
 *   p-values of transitive triplets must look uniform (Kolmogorov-Smirnov test with scipy.stats.kstest).
 *   The same p-values with the uncorrected variance (S_gg instead of V*) are not uniform, so the check can fail.
 * - Power: with transitive triplets present (1.0) most p-values fall below 0.05.
 * - Worked case: the one-step estimate lands near the value a full re-fit of the extended model gives.
 * Sizes are kept small for a shared 2-core machine.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { buildEffects } from '../../server/engine/effects';
import { candidateScoreTests, chiSquare1Sf, fitSaom, sampleMoments, buildSaomProblem, scoreTestFromMoments } from '../../server/engine/estimate';
import { createRng } from '../../server/engine/prng';
import { simulatePeriod } from '../../server/engine/simulate';

function py(code: string): string {
  const out = spawnSync('/usr/bin/python3', ['-c', code], { encoding: 'utf8' });
  if (out.status !== 0) throw new Error(out.stderr);
  return out.stdout.trim();
}
const ksUniform = (ps: number[]) => Number(py(`from scipy.stats import kstest; print(kstest(${JSON.stringify(ps)}, 'uniform').pvalue)`));

describe('chi-square tail', () => {
  it('equals scipy.stats.chi2.sf(x, 1)', () => {
    const xs = [0.01, 0.5, 1, 2.7055, 3.8415, 6.635, 10, 20];
    const ref = JSON.parse(py(`from scipy.stats import chi2; import json; print(json.dumps([float(chi2.sf(x, 1)) for x in ${JSON.stringify(xs)}]))`)) as number[];
    xs.forEach((x, k) => expect(Math.abs(chiSquare1Sf(x) - ref[k]) / ref[k], `x=${x}`).toBeLessThan(1e-6));
  });
});

const n = 25;
const NULL_BETA = [-2, 1.5];
const RATE = 4;
const effects3 = buildEffects([{ id: 'density' }, { id: 'reciprocity' }, { id: 'transitive_triplets' }]);

function startWave(seed: number): Uint8Array {
  const rng = createRng(seed);
  const first = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && rng.nextDouble() < 0.1) first[i * n + j] = 1;
  return Uint8Array.from(simulatePeriod({ start: first, rate: 20, effects: effects3, params: [...NULL_BETA, 0], rng }).end.adj);
}

describe('score-type test of transitive triplets on data from density and reciprocity', () => {
  const start = startWave(3);
  // Moments at the null values (candidate at 0), 150 runs with finite differences.
  const input = (end: Uint8Array) => ({
    n,
    periods: [{ start, end, effects: effects3 }],
    rates: [{ estimate: true, value: RATE }],
    params: [{ estimate: true, value: NULL_BETA[0] }, { estimate: true, value: NULL_BETA[1] }, { estimate: true, value: 0 }],
    seed: 11,
  });
  const built = buildSaomProblem(input(start));
  const moments = sampleMoments(built.problem, [RATE, ...NULL_BETA, 0], 150);
  const observedStats = (end: Uint8Array) => buildSaomProblem(input(end)).target;
  const endsFrom = (beta: number[], count: number, seed: number) => {
    const rng = createRng(seed);
    return Array.from({ length: count }, () => Uint8Array.from(simulatePeriod({ start, rate: RATE, effects: effects3, params: beta, rng }).end.adj));
  };

  it('gives uniform p-values under the null (KS, scipy), and the uncorrected variance does not', () => {
    const ends = endsFrom([...NULL_BETA, 0], 150, 99);
    const ps: number[] = [];
    const naive: number[] = [];
    for (const end of ends) {
      const r = scoreTestFromMoments(moments, observedStats(end), [0, 1, 2], 3);
      ps.push(r.pValue);
      naive.push(chiSquare1Sf((r.corrected * r.corrected) / moments.cov[3][3]));
    }
    expect(ksUniform(ps)).toBeGreaterThan(0.01);
    expect(ksUniform(naive)).toBeLessThan(0.01);
  });

  it('has power when the effect is present (transitive triplets 1.0)', () => {
    const ends = endsFrom([...NULL_BETA, 1.0], 40, 77);
    const ps = ends.map((end) => scoreTestFromMoments(moments, observedStats(end), [0, 1, 2], 3).pValue);
    expect(ps.filter((p) => p < 0.05).length / ps.length).toBeGreaterThan(0.7);
  });
});

describe('worked case: one-step estimate against the re-fitted value', () => {
  it('lands near the estimate of the extended model (n = 40, three waves, transitive triplets 0.25)', () => {
    const m = 40;
    const effects3 = buildEffects([{ id: 'density' }, { id: 'reciprocity' }, { id: 'transitive_triplets' }]);
    const rng = createRng(55);
    const first = new Uint8Array(m * m);
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) if (i !== j && rng.nextDouble() < 0.08) first[i * m + j] = 1;
    const beta = [-1.7, 1.2, 0.25];
    const waves = [Uint8Array.from(simulatePeriod({ start: first, rate: 20, effects: effects3, params: beta, rng }).end.adj)];
    for (let w = 1; w < 3; w++) waves.push(Uint8Array.from(simulatePeriod({ start: waves[w - 1], rate: RATE, effects: effects3, params: beta, rng }).end.adj));
    const periodsWith = (effects: typeof effects3) => waves.slice(0, -1).map((start, w) => ({ start, end: waves[w + 1], effects }));
    const est = { estimate: true };
    const nullFit = fitSaom({ n: m, periods: periodsWith(effects3.slice(0, 2)), rates: [est, est], params: [est, est], seed: 21 }, { phase3Runs: 200 });
    const v = nullFit.parameters.map((q) => q.value);
    const tests = candidateScoreTests(
      {
        n: m,
        periods: periodsWith(effects3),
        rates: [{ estimate: true, value: v[0] }, { estimate: true, value: v[1] }],
        params: [{ estimate: true, value: v[2] }, { estimate: true, value: v[3] }, { estimate: true, value: 0 }],
        seed: 22,
      },
      1,
      200,
    );
    const full = fitSaom({ n: m, periods: periodsWith(effects3), rates: [est, est], params: [est, est, est], seed: 23 }, { phase3Runs: 200 });
    const refit = full.parameters[4];
    const r = tests.results[0];
    console.log(`score test: statistic ${r.statistic.toFixed(2)}, p ${r.pValue.toExponential(2)}, one-step ${r.oneStep.toFixed(3)}; re-fit ${refit.value.toFixed(3)} (SE ${refit.se?.toFixed(3)}), converged ${full.converged}`);
    expect(refit.se!).toBeLessThan(0.25);
    expect(r.pValue).toBeLessThan(0.05);
    expect(Math.abs(r.oneStep - refit.value)).toBeLessThan(Math.max(0.1, refit.se!));
  });
});
