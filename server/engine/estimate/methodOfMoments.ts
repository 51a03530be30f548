/**
 * Method-of-moments estimation by the three-phase Robbins-Monro algorithm.
 *
 * Purpose: find theta with E_theta[Z] = z_obs for any seeded simulator of the statistics Z, report the
 * standard errors, the convergence t-ratios, the overall maximum convergence ratio and the condition
 * number of the derivative matrix. The stochastic actor-oriented model is plugged in by ./problem.ts;
 * this file knows nothing about networks. Its contract (problem, options, result, errors, the
 * convergence rule) is in ./moments.ts, the sampler of statistics and derivatives in ./sampler.ts.
 *
 * References:
 * - Robbins, H. & Monro, S. (1951). A stochastic approximation method. Annals of Mathematical
 *   Statistics 22, 400-407.
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics. Sociological
 *   Methodology 31, 361-395. (the three phases, diagonal gain matrix, sub-phase lengths, oscillation
 *   stopping rule, finite differences with common random numbers, cov = D^-1 Sigma D^-T)
 * - Ruppert, D. (1988). Efficient estimations from a slowly convergent Robbins-Monro process.
 *   Technical Report 781, Cornell University; Polyak, B.T. & Juditsky, A.B. (1992). Acceleration of
 *   stochastic approximation by averaging. SIAM J. Control and Optimization 30, 838-855. (averaging)
 * - Wavefit METHODS.md section 4.3, pitfalls 8.5, 8.7 and 8.9.
 */
import {
  conditionNumber,
  correlationFromCovariance,
  inverse,
  matMul,
  matVec,
  sampleCovariance,
  solve,
  symmetricPseudoInverse,
  transpose,
  zeros,
  type Matrix,
} from '../linalg';
import { createSampler, fmt, fmtVec } from './sampler';
import {
  EstimationCancelled,
  EstimationFailed,
  type EstimationResult,
  type EstimatorOptions,
  type MomentProblem,
} from './moments';

/**
 * Run the three phases. Throws EstimationCancelled when `shouldCancel` says so and EstimationFailed
 * (with a plain reason) when the parameters or the simulations run away or cannot be used.
 */
export function estimate(problem: MomentProblem, options: EstimatorOptions): EstimationResult {
  const p = problem.target.length;
  const { names, kinds } = problem;
  if (names.length !== p || kinds.length !== p) {
    throw new Error(`estimate: ${p} statistics but ${names.length} names and ${kinds.length} kinds`);
  }
  if (options.start.length !== p) {
    throw new Error(`estimate: ${p} statistics but ${options.start.length} starting values`);
  }
  if (p === 0) throw new Error('estimate: there is nothing to estimate (every parameter is fixed)');
  const log = options.log ?? (() => {});
  const progress = options.onProgress ?? (() => {});
  const cancelled = options.shouldCancel ?? (() => false);
  const eps = options.epsilon ?? 0.1;
  const limit = options.divergenceLimit ?? 40;
  const n1 = options.phase1Runs ?? 10 + 3 * p;
  const n3 = options.phase3Runs ?? 500;
  const a1 = options.gain ?? 0.2;
  const subphases = options.subphases ?? 4;
  const extra = options.subphaseExtra ?? 200;
  if (!(n1 >= 2) || !(n3 >= 2)) throw new Error('estimate: Phases 1 and 3 need at least 2 runs each');
  const target = problem.target.slice();
  const warnings: string[] = [];
  let currentPhase = 1;

  const checkTheta = (theta: number[], where: string): void => {
    for (let k = 0; k < p; k++) {
      const v = theta[k];
      if (!Number.isFinite(v)) {
        throw new EstimationFailed(`the parameter "${names[k]}" became ${String(v)} ${where}; the estimation diverged`, currentPhase);
      }
      if (kinds[k] === 'rate' && !(v > 0)) {
        throw new EstimationFailed(`the rate "${names[k]}" fell to ${fmt(v)} ${where}; it must stay positive`, currentPhase);
      }
      if (kinds[k] === 'objective' && Math.abs(v) > limit) {
        throw new EstimationFailed(
          `the parameter "${names[k]}" reached ${fmt(v)} ${where}, beyond +-${limit}; the estimation diverged ` +
            '(often a statistic at or near its bound, or effects that explain the same thing)',
          currentPhase,
        );
      }
    }
  };

  const sampler = createSampler(problem, {
    epsilon: eps,
    cancelled,
    progress,
    failure: (reason) => new EstimationFailed(reason, currentPhase),
  });
  const runner = sampler.runner;
  const sampleWithDerivative = sampler.sample;

  // ---------- Phase 1 ----------
  let theta = options.start.slice();
  checkTheta(theta, 'at the starting values');
  let d1: Matrix;
  let mean1: number[] | null = null;
  if (options.initialDerivative) {
    d1 = options.initialDerivative.map((row) => row.slice());
    if (d1.length !== p || d1.some((row) => row.length !== p || row.some((v) => !Number.isFinite(v)))) {
      throw new Error(`estimate: the initial derivative matrix must be ${p} x ${p} with finite entries`);
    }
    log(`Continuing from ${fmtVec(theta)} with the derivative matrix of the earlier fit; Phase 1 skipped.`);
  } else {
    log(`Phase 1: ${n1} runs at the starting values ${fmtVec(theta)}, derivatives by finite differences.`);
    let runs1 = n1;
    let ph1 = sampleWithDerivative(theta, 1, runs1);
    // With common random numbers a small perturbation may change no choice at all in a short Phase 1,
    // leaving a zero (or, by noise, negative) self-derivative. Lengthen Phase 1 (the same streams plus
    // new ones, so it stays reproducible) up to 8 times before giving up.
    const unresolved = () => ph1.d.some((row, k) => !(row[k] > 0));
    while (unresolved() && runs1 < 8 * n1) {
      runs1 *= 2;
      log(`Phase 1: a self-derivative was not positive; lengthening Phase 1 to ${runs1} runs.`);
      ph1 = sampleWithDerivative(theta, 1, runs1);
    }
    const m1 = ph1.zs[0].map((_, k) => ph1.zs.reduce((s, z) => s + z[k], 0) / ph1.zs.length);
    mean1 = m1;
    d1 = ph1.d;
    log(`Phase 1 done: mean deviation from the targets ${fmtVec(m1.map((m, k) => m - target[k]))}.`);
  }
  const diag = new Array<number>(p);
  const w = options.diagonalWeight ?? 1;
  if (!(w >= 0 && w <= 1)) throw new Error(`estimate: diagonalWeight must lie in [0, 1], got ${String(w)}`);
  for (let k = 0; k < p; k++) {
    const v = d1[k][k];
    if (!(Math.abs(v) > 0)) {
      throw new EstimationFailed(
        `the statistic for "${names[k]}" did not respond to its parameter in Phase 1; the parameter cannot be estimated from these data`,
        1,
      );
    }
    if (v < 0) {
      warnings.push(`Phase 1 estimated a negative self-derivative for "${names[k]}"; its absolute value was used.`);
      log(`Warning: negative Phase 1 derivative for ${names[k]} (${fmt(v)}); using its absolute value.`);
    }
    diag[k] = Math.abs(v);
  }

  const capStep = (delta: number[], at: number[]): number[] =>
    delta.map((dk, k) => {
      const cap = kinds[k] === 'rate' ? 0.5 * at[k] : 1;
      return Math.max(-cap, Math.min(cap, dk));
    });

  if (mean1 !== null && (options.newtonStep ?? true)) {
    const damping = options.newtonDamping ?? 0.5;
    let step: number[] | null = null;
    try {
      step = solve(d1, mean1.map((m, k) => m - target[k]));
    } catch {
      log('Phase 1 derivative matrix is singular; skipping the Newton step.');
    }
    if (step !== null && step.every(Number.isFinite)) {
      const delta = capStep(
        step.map((s) => damping * s),
        theta,
      );
      theta = theta.map((t, k) => t - delta[k]);
      checkTheta(theta, 'after the Phase 1 Newton step');
      log(`Newton step (damping ${damping}): theta = ${fmtVec(theta)}.`);
    }
  }

  // Gain matrix inverse D0^-1 (diagonal unless w < 1).
  let gainInverse: Matrix | null = null;
  if (w < 1) {
    const d0 = zeros(p);
    for (let k = 0; k < p; k++) for (let l = 0; l < p; l++) d0[k][l] = k === l ? diag[k] : (1 - w) * d1[k][l];
    try {
      gainInverse = inverse(d0);
    } catch {
      log('The Phase 2 gain matrix is singular; using its diagonal only.');
    }
  }
  const direction = (dev: number[]): number[] =>
    gainInverse === null ? dev.map((dk, k) => dk / diag[k]) : matVec(gainInverse, dev);

  // ---------- Phase 2 ----------
  currentPhase = 2;
  const phase2Iterations: number[] = [];
  let iteration = 0;
  for (let sub = 1; sub <= subphases; sub++) {
    const gain = a1 * Math.pow(2, -(sub - 1));
    const minLength = Math.ceil(Math.pow(2, (4 * (sub - 1)) / 3) * (7 + p));
    const maxLength = minLength + extra;
    const sum = new Array<number>(p).fill(0);
    const oscillation = new Array<number>(p).fill(0);
    let previous: number[] | null = null;
    let count = 0;
    log(`Phase 2 sub-phase ${sub}: gain ${fmt(gain)}, ${minLength} to ${maxLength} iterations.`);
    while (count < maxLength) {
      const z = runner.run(theta, 2, iteration);
      iteration++;
      count++;
      for (let k = 0; k < p; k++) sum[k] += theta[k];
      const dev = z.map((v, k) => v - target[k]);
      if (previous !== null) for (let k = 0; k < p; k++) oscillation[k] += dev[k] * previous[k];
      previous = dev;
      const delta = capStep(
        direction(dev).map((dk) => gain * dk),
        theta,
      );
      theta = theta.map((t, k) => t - delta[k]);
      checkTheta(theta, `in Phase 2 sub-phase ${sub}, iteration ${count}`);
      progress({ phase: 2, subphase: sub, iteration: count, planned: maxLength, theta: theta.slice() });
      if (count >= minLength && oscillation.every((o) => o < 0)) break;
    }
    theta = sum.map((s) => s / count);
    checkTheta(theta, `at the end of Phase 2 sub-phase ${sub}`);
    phase2Iterations.push(count);
    log(`Sub-phase ${sub} ended after ${count} iterations; average theta = ${fmtVec(theta)}.`);
  }

  // ---------- Phase 3 ----------
  currentPhase = 3;
  log(`Phase 3: ${n3} runs at the estimates for standard errors and convergence.`);
  const ph3 = sampleWithDerivative(theta, 3, n3);
  const { mean, cov: sigma } = sampleCovariance(ph3.zs);
  const d3 = ph3.d;
  const dev = mean.map((m, k) => m - target[k]);
  const convergenceT = dev.map((dk, k) => {
    const sd = Math.sqrt(sigma[k][k]);
    if (sd > 0) return dk / sd;
    return dk === 0 ? 0 : Math.sign(dk) * Infinity;
  });
  const { inverse: sigmaPlus, rank } = symmetricPseudoInverse(sigma);
  if (rank < p) warnings.push(`The simulated statistics are linearly dependent (rank ${rank} of ${p}).`);
  let quad = 0;
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) quad += dev[i] * sigmaPlus[i][j] * dev[j];
  const tauMax = Math.sqrt(Math.max(quad, 0));
  const cond = conditionNumber(d3);
  let covariance: Matrix | null = null;
  let correlation: Matrix | null = null;
  let standardErrors = new Array<number>(p).fill(NaN);
  try {
    const dInv = inverse(d3);
    covariance = matMul(matMul(dInv, sigma), transpose(dInv));
    // Symmetrise rounding.
    for (let i = 0; i < p; i++) for (let j = 0; j < i; j++) {
      const v = 0.5 * (covariance[i][j] + covariance[j][i]);
      covariance[i][j] = v;
      covariance[j][i] = v;
    }
    correlation = correlationFromCovariance(covariance);
    standardErrors = covariance.map((row, k) => Math.sqrt(Math.max(row[k], 0)));
  } catch {
    warnings.push('The Phase 3 derivative matrix is singular, so no standard errors could be computed (collinear effects?).');
  }
  if (cond > 1e6 && covariance !== null) {
    warnings.push(`The derivative matrix is nearly singular (condition number ${fmt(cond)}); standard errors are unreliable.`);
  }
  log(
    `Phase 3 done: max |t| = ${fmt(Math.max(...convergenceT.map(Math.abs)))}, tau_max = ${fmt(tauMax)}, ` +
      `condition number ${fmt(cond)}.`,
  );
  return {
    theta,
    standardErrors,
    covariance,
    correlation,
    convergenceT,
    tauMax,
    conditionNumber: cond,
    derivative: d3,
    derivativeSE: ph3.se,
    meanStatistics: mean,
    statisticCovariance: sigma,
    target,
    phase2Iterations,
    simulatorCalls: runner.calls,
    simulatedPeriods: runner.calls * problem.periodsPerRun,
    warnings,
  };
}
