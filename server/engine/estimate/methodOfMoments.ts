/**
 * Method-of-moments estimation by the three-phase Robbins-Monro algorithm.
 *
 * Purpose: find theta with E_theta[Z] = z_obs for any seeded simulator of the statistics Z, report the
 * standard errors, the convergence t-ratios, the overall maximum convergence ratio and the condition
 * number of the derivative matrix. The stochastic actor-oriented model is plugged in by ./problem.ts;
 * this file knows nothing about networks.
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

/** Stream keys: the first key of every random stream says which phase drew it. */
export const PHASE_1 = 1;
export const PHASE_2 = 2;
export const PHASE_3 = 3;

export type ParameterKind = 'rate' | 'objective';

/**
 * What the estimator needs from a model: the observed statistics and a simulator of them. One statistic
 * per estimated parameter, in the same order.
 */
export interface MomentProblem {
  /** Display names of the estimated parameters (for the log and error messages). */
  names: string[];
  /** Rates get relative finite differences and step caps and must stay positive. */
  kinds: ParameterKind[];
  /** Observed statistics z_obs. */
  target: number[];
  /** Simulated periods per call of `simulate` (for the "periods used" figure). */
  periodsPerRun: number;
  /**
   * Simulated statistics Z at theta, using only the random streams named by (phase, iteration). The same
   * (theta, phase, iteration) must give the same Z (common random numbers). May throw on runaway runs.
   */
  simulate(theta: ReadonlyArray<number>, phase: number, iteration: number): number[];
}

export interface Progress {
  phase: 1 | 2 | 3;
  /** Sub-phase 1..4 in Phase 2, else 0. */
  subphase: number;
  /** Iteration within the phase (runs done so far in Phases 1 and 3). */
  iteration: number;
  /** Iterations planned for this phase (a maximum in Phase 2). */
  planned: number;
  theta: number[];
}

export interface EstimatorOptions {
  /** Starting values theta^0 (estimated parameters only). */
  start: number[];
  /**
   * A derivative matrix known already (e.g. the Phase 3 matrix of an earlier fit that this one continues
   * from): Phase 1 and its Newton step are skipped and Phases 2-3 rerun from `start` (METHODS 4.3).
   */
  initialDerivative?: Matrix;
  /** Phase 1 runs; default 10 + 3p (METHODS 4.3, our choice). */
  phase1Runs?: number;
  /** Take one damped Newton step after Phase 1 (default true). */
  newtonStep?: boolean;
  /** Damping of that step (default 0.5). */
  newtonDamping?: number;
  /**
   * Weight w of the diagonal in the Phase 2 gain matrix D0 = w diag(D) + (1 - w) D (default 1: the
   * diagonal alone, as in METHODS 4.3).
   */
  diagonalWeight?: number;
  /** First gain a_1 (default 0.2). */
  gain?: number;
  /** Number of Phase 2 sub-phases (default 4). */
  subphases?: number;
  /** Extra iterations allowed beyond a sub-phase's minimum before it ends anyway (default 200). */
  subphaseExtra?: number;
  /** Phase 3 runs (default 500). */
  phase3Runs?: number;
  /** Finite-difference step: epsilon for objective parameters, epsilon * lambda for rates (default 0.1). */
  epsilon?: number;
  /** |theta| beyond which an objective parameter counts as diverged (default 40). */
  divergenceLimit?: number;
  /** Called after every run or iteration. */
  onProgress?: (progress: Progress) => void;
  /** Checked before every run; returning true stops the estimation with EstimationCancelled. */
  shouldCancel?: () => boolean;
  /** One line per notable event, for the job log. */
  log?: (line: string) => void;
}

export interface EstimationResult {
  theta: number[];
  /** Standard errors; NaN where the derivative matrix could not be inverted. */
  standardErrors: number[];
  /** cov(theta-hat) = D^-1 Sigma D^-T; null when D is singular. */
  covariance: Matrix | null;
  correlation: Matrix | null;
  /** Convergence t-ratio per statistic: (mean Z - z_obs) / sd(Z). */
  convergenceT: number[];
  /** Overall maximum convergence ratio sqrt(d' Sigma^-1 d). */
  tauMax: number;
  /** Condition number of the Phase 3 derivative matrix. */
  conditionNumber: number;
  /** Phase 3 derivative matrix D[statistic][parameter]. */
  derivative: Matrix;
  /** Monte Carlo standard errors of the entries of `derivative`. */
  derivativeSE: Matrix;
  /** Phase 3 mean and covariance of the statistics. */
  meanStatistics: number[];
  statisticCovariance: Matrix;
  target: number[];
  /** Phase 2 iterations per sub-phase. */
  phase2Iterations: number[];
  /** Calls of the simulator and periods simulated in all. */
  simulatorCalls: number;
  simulatedPeriods: number;
  /** Warnings in plain words (e.g. a singular derivative matrix). */
  warnings: string[];
}

export class EstimationCancelled extends Error {
  constructor() {
    super('estimate: cancelled');
    this.name = 'EstimationCancelled';
  }
}

/** A fit that could not be completed; `reason` is a plain sentence for the user. */
export class EstimationFailed extends Error {
  constructor(
    readonly reason: string,
    readonly phase: number,
  ) {
    super(`estimate: ${reason}`);
    this.name = 'EstimationFailed';
  }
}

/** The common-practice thresholds for convergence: every |t| < 0.1 and tau_max < 0.25. */
export const CONVERGENCE_T_LIMIT = 0.1;
export const TAU_MAX_LIMIT = 0.25;

export function isConverged(result: Pick<EstimationResult, 'convergenceT' | 'tauMax'>): boolean {
  return result.convergenceT.every((t) => Math.abs(t) < CONVERGENCE_T_LIMIT) && result.tauMax < TAU_MAX_LIMIT;
}


function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return Math.abs(x) >= 1000 || (Math.abs(x) < 0.001 && x !== 0) ? x.toExponential(3) : x.toFixed(4);
}

function fmtVec(v: ReadonlyArray<number>): string {
  return `(${v.map(fmt).join(', ')})`;
}

interface Runner {
  calls: number;
  run(theta: number[], phase: number, iteration: number): number[];
}

export interface MomentSample {
  /** Statistics of the base runs, one row per run. */
  zs: number[][];
  /** Finite-difference derivative matrix D[statistic][parameter]. */
  d: Matrix;
  /** Monte Carlo standard errors of the entries of d. */
  se: Matrix;
}

interface SamplerContext {
  epsilon: number;
  cancelled: () => boolean;
  progress: (progress: Progress) => void;
  failure: (reason: string) => Error;
}

/** A counted, checked simulator and the finite-difference sampler of METHODS 4.2.1 over it. */
function createSampler(problem: MomentProblem, ctx: SamplerContext) {
  const p = problem.target.length;
  const { names, kinds } = problem;
  const runner: Runner = {
    calls: 0,
    run(theta, phase, iteration) {
      if (ctx.cancelled()) throw new EstimationCancelled();
      let z: number[];
      try {
        z = problem.simulate(theta, phase, iteration);
      } catch (e) {
        if (e instanceof EstimationCancelled || e instanceof EstimationFailed) throw e;
        const message = e instanceof Error ? e.message.replace(/^simulate: /, '') : String(e);
        throw ctx.failure(`a simulation failed at ${fmtVec(theta)}: ${message}`);
      }
      this.calls++;
      if (z.length !== p) throw new Error(`estimate: the simulator returned ${z.length} statistics, expected ${p}`);
      for (let k = 0; k < p; k++) {
        if (!Number.isFinite(z[k])) throw ctx.failure(`the simulated statistic for "${names[k]}" is ${String(z[k])}`);
      }
      return z;
    },
  };
  const stepSize = (theta: number[], k: number): number => (kinds[k] === 'rate' ? ctx.epsilon * theta[k] : ctx.epsilon);
  /** N runs at theta with finite differences on common random numbers (METHODS 4.2.1). */
  const sample = (theta: number[], phase: 1 | 3, runs: number): MomentSample => {
    const zs: number[][] = [];
    const d = zeros(p);
    const d2 = zeros(p);
    for (let s = 0; s < runs; s++) {
      const z0 = runner.run(theta, phase, s);
      zs.push(z0);
      for (let l = 0; l < p; l++) {
        const h = stepSize(theta, l);
        const shifted = theta.slice();
        shifted[l] += h;
        const z1 = runner.run(shifted, phase, s);
        for (let k = 0; k < p; k++) {
          const q = (z1[k] - z0[k]) / h;
          d[k][l] += q;
          d2[k][l] += q * q;
        }
      }
      ctx.progress({ phase, subphase: 0, iteration: s + 1, planned: runs, theta: theta.slice() });
    }
    // Mean and its Monte Carlo standard error per entry.
    const se = zeros(p);
    for (let k = 0; k < p; k++) {
      for (let l = 0; l < p; l++) {
        const mean = d[k][l] / runs;
        const variance = Math.max(0, (d2[k][l] - runs * mean * mean) / (runs - 1));
        d[k][l] = mean;
        se[k][l] = Math.sqrt(variance / runs);
      }
    }
    return { zs, d, se };
  };
  return { runner, sample };
}

/**
 * Phase-3-style sampling at a given theta without estimating: N runs with finite-difference derivatives
 * on common random numbers (METHODS 4.2.1), e.g. to check the derivative matrix against an exact value.
 */
export function sampleMoments(
  problem: MomentProblem,
  theta: number[],
  runs: number,
  options: { epsilon?: number; phase?: 1 | 3 } = {},
): MomentSample & { mean: number[]; cov: Matrix } {
  if (!(runs >= 2)) throw new Error('estimate: sampling needs at least 2 runs');
  const sampler = createSampler(problem, {
    epsilon: options.epsilon ?? 0.1,
    cancelled: () => false,
    progress: () => {},
    failure: (reason) => new EstimationFailed(reason, options.phase ?? 3),
  });
  const result = sampler.sample(theta, options.phase ?? 3, runs);
  const { mean, cov } = sampleCovariance(result.zs);
  return { ...result, mean, cov };
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
