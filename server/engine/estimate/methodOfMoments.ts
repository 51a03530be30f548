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
  DEFAULT_PHASE3_DERIVATIVE_RUNS,
  isConverged,
  phase3Key,
  type EstimationResult,
  type RoundSummary,
  type EstimatorOptions,
  type MomentProblem,
} from './moments';

/**
 * The published Phase 2 rules (Snijders 2001, section on the Robbins-Monro algorithm; METHODS 4.3):
 * sub-phase k has gain a_k = a_1 2^-(k-1) and runs at least N_k- = 2^(4(k-1)/3) (7 + p) iterations
 * (rounded up) and at most N_k+ = N_k- + extra (200 by default).
 */
export function subphaseRule(k: number, p: number, a1 = 0.2, extra = 200): { gain: number; minLength: number; maxLength: number } {
  if (!(Number.isInteger(k) && k >= 1)) throw new Error(`estimate: sub-phase numbers start at 1, got ${String(k)}`);
  const minLength = Math.ceil(Math.pow(2, (4 * (k - 1)) / 3) * (7 + p) - 1e-9);
  return { gain: a1 * Math.pow(2, -(k - 1)), minLength, maxLength: minLength + extra };
}

/**
 * Whether a sub-phase ends after `count` iterations: at its maximum, or once its minimum is reached and,
 * for every coordinate, the running sum over the sub-phase of the products of successive deviations
 * (Z_N - z_obs)(Z_N-1 - z_obs) is negative (the process oscillates around the root).
 */
/**
 * Continuation rounds average their Newton estimates of the root and their derivative matrices only
 * over consecutive rounds whose check had tau_max below this (our choice: within about one standard
 * deviation of the observed statistics, where the moment function is close to linear).
 */
export const NEAR_ROOT_TAU = 1;

export function subphaseEnds(count: number, minLength: number, maxLength: number, oscillation: ReadonlyArray<number>): boolean {
  if (count >= maxLength) return true;
  return count >= minLength && oscillation.every((o) => o < 0);
}

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
    let ph1 = sampleWithDerivative(theta, 1, runs1, { progressPhase: 1 });
    // With common random numbers a small perturbation may change no choice at all in a short Phase 1,
    // leaving a zero (or, by noise, negative) self-derivative. Lengthen Phase 1 (the same streams plus
    // new ones, so it stays reproducible) up to 8 times before giving up.
    const unresolved = () => ph1.d.some((row, k) => !(row[k] > 0));
    while (unresolved() && runs1 < 8 * n1) {
      runs1 *= 2;
      log(`Phase 1: a self-derivative was not positive; lengthening Phase 1 to ${runs1} runs.`);
      ph1 = sampleWithDerivative(theta, 1, runs1, { progressPhase: 1 });
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
  /** The Phase 2 sub-phases from `from`; returns the average over the last sub-phase. */
  const phase2 = (from: number[], report: boolean): number[] => {
    let at = from.slice();
    for (let sub = 1; sub <= subphases; sub++) {
      const { gain, minLength, maxLength } = subphaseRule(sub, p, a1, extra);
      const sum = new Array<number>(p).fill(0);
      const oscillation = new Array<number>(p).fill(0);
      let previous: number[] | null = null;
      let count = 0;
      log(`Phase 2 sub-phase ${sub}: gain ${fmt(gain)}, ${minLength} to ${maxLength} iterations.`);
      while (count < maxLength) {
        const z = runner.run(at, 2, iteration);
        iteration++;
        count++;
        for (let k = 0; k < p; k++) sum[k] += at[k];
        const dev = z.map((v, k) => v - target[k]);
        if (previous !== null) for (let k = 0; k < p; k++) oscillation[k] += dev[k] * previous[k];
        previous = dev;
        const delta = capStep(
          direction(dev).map((dk) => gain * dk),
          at,
        );
        at = at.map((t, k) => t - delta[k]);
        checkTheta(at, `in Phase 2 sub-phase ${sub}, iteration ${count}`);
        if (report) progress({ phase: 2, subphase: sub, iteration: count, planned: maxLength, theta: at.slice() });
        if (subphaseEnds(count, minLength, maxLength, oscillation)) break;
      }
      at = sum.map((v) => v / count);
      checkTheta(at, `at the end of Phase 2 sub-phase ${sub}`);
      if (report) phase2Iterations.push(count);
      log(`Sub-phase ${sub} ended after ${count} iterations; average theta = ${fmtVec(at)}.`);
    }
    return at;
  };
  theta = phase2(theta, true);

  // ---------- Phase 3, and continuation rounds ----------
  currentPhase = 3;
  const derivativeRuns = Math.min(n3, options.phase3DerivativeRuns ?? DEFAULT_PHASE3_DERIVATIVE_RUNS);
  if (!(derivativeRuns >= 2)) throw new Error('estimate: Phase 3 needs at least 2 runs with derivatives');
  // Continuation rounds add half as many derivative runs to the pooled matrix.
  const laterDerivativeRuns = Math.max(2, Math.ceil(derivativeRuns / 2));
  const maxRounds = options.maxRounds ?? 1;
  if (!(Number.isInteger(maxRounds) && maxRounds >= 1)) throw new Error(`estimate: maxRounds must be a whole number of at least 1, got ${String(maxRounds)}`);
  const rounds: RoundSummary[] = [];
  // The derivative matrix pooled over the rounds' Phase 3s (all at estimates a fraction of a standard
  // error apart): sums of the per-run difference quotients and their squares, and the run count.
  const dSum = zeros(p);
  const dSq = zeros(p);
  let dRuns = 0;
  const checks: Array<{ theta: number[]; dev: number[] }> = [];
  let lastNear = true;
  let check = phase3Check(theta, 1);
  for (;;) {
    // Pool only over rounds near the root (tau_max below NEAR_ROOT_TAU), where Z is close to linear
    // in theta; a round farther off starts the pool afresh.
    const near = check.tauMax < NEAR_ROOT_TAU;
    if (!near || !lastNear) checks.length = 0;
    lastNear = near;
    checks.push({ theta: theta.slice(), dev: check.dev });
    rounds.push({ theta: theta.slice(), maxAbsT: check.maxAbsT, tauMax: check.tauMax, converged: check.converged });
    if (check.converged || rounds.length >= maxRounds) break;
    // Continuation (METHODS 4.3: rerun from the estimates when a threshold is missed). Each Phase 3 has
    // the form of a Phase 1 with many runs, so it gives a Newton estimate of the root,
    // theta_r - D^-1 (mean Z_r - z_obs), with error covariance D^-1 Sigma D^-T / N3 (independent across
    // rounds: fresh streams). The next round starts from the average of these estimates over the rounds
    // so far, with the pooled derivative matrix D (our choice; the estimates lie a fraction of a standard
    // error apart, where Z is close to linear in theta).
    if (!near) {
      // Far from the root (tau_max >= NEAR_ROOT_TAU), where a Newton step may overshoot: rerun Phase 2
      // from the estimates (METHODS 4.3, Snijders 2001), its gains scaled by this Phase 3's derivatives.
      for (let k = 0; k < p; k++) if (check.d[k][k] > 0) diag[k] = check.d[k][k];
      log(`Not converged yet (max |t| ${fmt(check.maxAbsT)}, tau_max ${fmt(check.tauMax)}); round ${rounds.length + 1} reruns Phase 2 from the estimates.`);
      currentPhase = 2;
      theta = phase2(theta, false);
      currentPhase = 3;
      check = phase3Check(theta, rounds.length + 1);
      continue;
    }
    let next: number[] | null = null;
    try {
      const roots = checks.map((c) => {
        const step = solve(check.d, c.dev);
        return c.theta.map((t, k) => t - step[k]);
      });
      next = theta.map((_, k) => roots.reduce((s, r) => s + r[k], 0) / roots.length);
    } catch {
      log('The derivative matrix is singular; no continuation round is possible.');
    }
    if (next === null || !next.every(Number.isFinite)) break;
    const delta = capStep(
      theta.map((t, k) => t - next![k]),
      theta,
    );
    theta = theta.map((t, k) => t - delta[k]);
    checkTheta(theta, `in continuation round ${rounds.length + 1}`);
    log(`Not converged yet (max |t| ${fmt(check.maxAbsT)}, tau_max ${fmt(check.tauMax)}); round ${rounds.length + 1} continues from ${fmtVec(theta)}.`);
    check = phase3Check(theta, rounds.length + 1);
  }
  const { mean, sigma, convergenceT, tauMax } = check;
  const d3 = check.d;
  const derivativeSE = check.se;
  if (check.rank < p) warnings.push(`The simulated statistics are linearly dependent (rank ${check.rank} of ${p}).`);
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
    `Phase 3 done after ${rounds.length} round${rounds.length === 1 ? '' : 's'}: max |t| = ${fmt(check.maxAbsT)}, tau_max = ${fmt(tauMax)}, ` +
      `condition number ${fmt(cond)}.`,
  );

  /** One Phase 3 at theta: N3 runs for the mean and covariance, derivatives on the first ones, pooled over rounds. */
  function phase3Check(at: number[], round: number) {
    // A round after one far from the root starts a new derivative pool, so it gets the full number.
    const withD = round > 1 && lastNear ? laterDerivativeRuns : derivativeRuns;
    log(`Phase 3${round > 1 ? ` (round ${round})` : ''}: ${n3} runs at the estimates, ${withD} of them with finite-difference derivatives.`);
    const sample = sampleWithDerivative(at, phase3Key(round), n3, { derivativeRuns: withD, progressPhase: 3, progressSubphase: round > 1 ? round : 0 });
    const { mean: m, cov } = sampleCovariance(sample.zs);
    const deviation = m.map((v, k) => v - target[k]);
    const { inverse: sigmaPlus, rank } = symmetricPseudoInverse(cov);
    let quad = 0;
    for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) quad += deviation[i] * sigmaPlus[i][j] * deviation[j];
    const tau = Math.sqrt(Math.max(quad, 0));
    // The derivative matrix is pooled over the rounds near the root only (as the Newton estimates are).
    if (!(tau < NEAR_ROOT_TAU) || !lastNear) {
      for (let k = 0; k < p; k++) for (let l = 0; l < p; l++) {
        dSum[k][l] = 0;
        dSq[k][l] = 0;
      }
      dRuns = 0;
    }
    dRuns += sample.derivativeRuns;
    for (let k = 0; k < p; k++) for (let l = 0; l < p; l++) {
      dSum[k][l] += sample.d[k][l] * sample.derivativeRuns;
      dSq[k][l] += sample.sumSquares[k][l];
    }
    const d = dSum.map((row) => row.map((v) => v / dRuns));
    const se = d.map((row, k) =>
      row.map((m, l) => (dRuns > 1 ? Math.sqrt(Math.max(0, (dSq[k][l] - dRuns * m * m) / (dRuns - 1)) / dRuns) : NaN)),
    );
    const ts = deviation.map((dk, k) => {
      const sd = Math.sqrt(cov[k][k]);
      if (sd > 0) return dk / sd;
      return dk === 0 ? 0 : Math.sign(dk) * Infinity;
    });
    const maxAbsT = Math.max(...ts.map(Math.abs));
    return {
      mean: m,
      sigma: cov,
      dev: deviation,
      convergenceT: ts,
      tauMax: tau,
      maxAbsT,
      rank,
      d,
      se,
      converged: isConverged({ convergenceT: ts, tauMax: tau }),
    };
  }

  return {
    theta,
    standardErrors,
    covariance,
    correlation,
    convergenceT,
    tauMax,
    conditionNumber: cond,
    derivative: d3,
    derivativeSE,
    meanStatistics: mean,
    statisticCovariance: sigma,
    target,
    phase2Iterations,
    rounds,
    simulatorCalls: runner.calls,
    simulatedPeriods: runner.calls * problem.periodsPerRun,
    warnings,
  };
}
