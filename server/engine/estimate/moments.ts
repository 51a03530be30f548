/**
 * The method of moments' contract: the problem it solves (a seeded simulator of statistics Z and the
 * observed z_obs), its options and progress reports, its result, how it ends when cancelled or
 * failing, and the convergence rule. The algorithm is in ./methodOfMoments.ts, its sampler of
 * statistics and finite-difference derivatives in ./sampler.ts.
 *
 * References: see ./methodOfMoments.ts; the convergence thresholds are common practice.
 */
import type { Matrix } from '../linalg';

/** Stream keys: the first key of every random stream says which phase drew it. */
export const PHASE_1 = 1;

export const PHASE_2 = 2;

export const PHASE_3 = 3;

/** Stream key of the Phase 3 of continuation round r >= 2 (round 1 uses PHASE_3). */
export function phase3Key(round: number): number {
  return round <= 1 ? PHASE_3 : 100 + round;
}

/**
 * Phase 3 runs that also get finite-difference derivatives (p more simulations each), by default: the
 * derivative matrix needs far fewer runs than the convergence check, whose Monte Carlo error is
 * 1/sqrt(N3) in t-ratio units (our choice; the matrix is pooled over continuation rounds).
 */
export const DEFAULT_PHASE3_DERIVATIVE_RUNS = 100;

/**
 * Rounds a fit may take by default in the product: the first (Phases 1-3), then up to two
 * continuations from the last estimates while the convergence thresholds are missed.
 */
export const DEFAULT_ROUND_BUDGET = 3;

export interface RoundSummary {
  /** Estimates checked in this round's Phase 3. */
  theta: number[];
  maxAbsT: number;
  tauMax: number;
  converged: boolean;
}

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
  /** Phase 3 runs that also get finite-difference derivatives (default min(N3, 100)). */
  phase3DerivativeRuns?: number;
  /**
   * Budget of rounds (default 1): while a round's Phase 3 misses the convergence thresholds and the
   * budget allows, take a Newton step from its estimates and check again with a new Phase 3.
   */
  maxRounds?: number;
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
  /** One entry per Phase 3 run (the first round and any continuations); the last is the result. */
  rounds: RoundSummary[];
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
