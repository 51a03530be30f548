/**
 * Score-type tests of candidate effects: for an effect not in the model, whether its parameter at 0 is
 * compatible with the data, from simulations at the fitted estimates (no re-fit), and the one-step
 * estimate of the parameter.
 *
 * Purpose: with theta = (psi, gamma), psi estimated and gamma the candidate fixed at 0, the moment
 * deviation of the candidate's statistic d_gamma = z_obs,gamma - E[Z_gamma] is corrected for the
 * estimation of psi (orthogonalised with the derivative matrix D = dE[Z]/dtheta'):
 *   d* = d_gamma - D_gamma,psi D_psi,psi^-1 d_psi,
 *   V* = S_gg - B S_pg - S_gp B' + B S_pp B',   B = D_gamma,psi D_psi,psi^-1,
 * and d*' V*^-1 d* is referred to chi-square with 1 degree of freedom. The one-step estimate is the
 * gamma component of one Newton step of the moment equations from (psi_hat, 0):
 *   theta_1 = theta_0 + D^-1 (z_obs - E[Z]).
 * Mean, covariance and D come from Phase-3-like runs at (psi_hat, 0) with finite differences on common
 * random numbers (sampleMoments, METHODS.md 4.2.1).
 *
 * References:
 * - Schweinberger, M. (2012). Statistical modelling of network panel data: goodness of fit. British
 *   Journal of Mathematical and Statistical Psychology 65, 263-281. (the generalised score-type test
 *   and the one-step estimate for method-of-moments estimators; the formulas above are our reading)
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics. Sociological
 *   Methodology 31, 361-395. (moment equations, D and the delta method)
 */
import { inverse, matMul, matVec, solve, transpose, type Matrix } from '../linalg';
import { buildSaomProblem, type SaomProblemInput } from './problem';
import { sampleMoments } from './sampler';

export interface ScoreTestResult {
  /** Index of the candidate among all parameters of the sampled problem (rates first). */
  index: number;
  /** Generalised score-type statistic, chi-square with 1 df under the null. */
  statistic: number;
  pValue: number;
  /** One-step estimate of the candidate's parameter (from 0). */
  oneStep: number;
  /** Observed minus expected candidate statistic, before and after the correction for psi. */
  deviation: number;
  corrected: number;
}

/** P(chi-square with 1 df > x) = erfc(sqrt(x / 2)). */
export function chiSquare1Sf(x: number): number {
  if (!(x > 0)) return 1;
  return erfc(Math.sqrt(x / 2));
}

/**
 * Complementary error function, by the Chebyshev fit of Press et al. (2007), Numerical Recipes, 3rd ed.,
 * section 6.2 (erfccheb; fractional error below 1.2e-7, from memory).
 */
export function erfc(x: number): number {
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const r =
    t *
    Math.exp(
      -z * z -
        1.26551223 +
        t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? r : 2 - r;
}

const pick = (m: Matrix, rows: number[], cols: number[]): Matrix => rows.map((r) => cols.map((c) => m[r][c]));

/**
 * The score-type test of the parameter `tested` given the estimated parameters `estimated` (indices into
 * mean, cov, d and observed; other indices, e.g. other candidates, are left out of both).
 */
export function scoreTestFromMoments(
  moments: { mean: number[]; cov: Matrix; d: Matrix },
  observed: number[],
  estimated: number[],
  tested: number,
): ScoreTestResult {
  const { mean, cov, d } = moments;
  const dev = observed.map((z, k) => z - mean[k]);
  const g = [tested];
  const P = estimated;
  // B = D_g,psi D_psi,psi^-1 (a 1 x |psi| row).
  const B = P.length ? matMul(pick(d, g, P), inverse(pick(d, P, P))) : [[]];
  const devP = P.map((k) => dev[k]);
  const corrected = dev[tested] - (P.length ? matVec(B, devP)[0] : 0);
  const BSpg = P.length ? matMul(B, pick(cov, P, g))[0][0] : 0;
  const BSppBt = P.length ? matMul(matMul(B, pick(cov, P, P)), transpose(B))[0][0] : 0;
  const variance = cov[tested][tested] - 2 * BSpg + BSppBt;
  const statistic = variance > 0 ? (corrected * corrected) / variance : 0;
  // One Newton step on the moment equations of psi and this candidate.
  const all = [...P, tested];
  const step = solve(pick(d, all, all), all.map((k) => dev[k]));
  return { index: tested, statistic, pValue: chiSquare1Sf(statistic), oneStep: step[step.length - 1], deviation: dev[tested], corrected };
}

export interface CandidateScoreTests {
  results: ScoreTestResult[];
  runs: number;
  /** Every parameter of the sampled problem, rates first (the model's, then the candidates'). */
  keys: string[];
}

/**
 * Score-type tests of each candidate at once: `input` holds the model's effects followed by the
 * candidates (params: the model's fitted values, then 0 for each candidate) and rates at their fitted
 * values; `candidates` says how many trailing effects are candidates. The model's parameters marked
 * `estimate: true` are the estimated ones the test corrects for; fixed ones are left out of it. Runs `runs` simulations at those
 * values with finite-difference derivatives (cost: runs x (parameters + 1) simulated panels).
 */
export function candidateScoreTests(input: SaomProblemInput, candidates: number, runs: number): CandidateScoreTests {
  const all = {
    ...input,
    rates: input.rates.map((r) => ({ estimate: true, value: r.value })),
    params: input.params.map((q) => ({ estimate: true, value: q.value ?? 0 })),
  };
  const built = buildSaomProblem(all);
  const theta = built.parameters.map((q) => (q.kind === 'rate' ? input.rates[q.index].value! : (input.params[q.index].value ?? 0)));
  const sample = sampleMoments(built.problem, theta, runs, { phase: 3 });
  const p = theta.length;
  const first = p - candidates;
  const estimated = built.parameters
    .map((q, k) => ({ k, estimated: q.kind === 'rate' ? input.rates[q.index].estimate : input.params[q.index].estimate }))
    .filter((x) => x.k < first && x.estimated)
    .map((x) => x.k);
  const results: ScoreTestResult[] = [];
  for (let c = first; c < p; c++) results.push(scoreTestFromMoments(sample, built.target, estimated, c));
  return { results, runs, keys: built.parameters.map((q) => q.key) };
}
