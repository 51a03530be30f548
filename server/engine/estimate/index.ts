/**
 * Model fitting: the public entry of the estimator.
 *
 * Purpose: fit a stochastic actor-oriented model to panel waves by the method of moments (three-phase
 * Robbins-Monro) and return every parameter, estimated or fixed, with its standard error and the
 * convergence diagnostics, in a JSON-friendly shape.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics. Sociological
 *   Methodology 31, 361-395.
 * - Wavefit METHODS.md section 4.
 */
import { estimate } from './methodOfMoments';
import { isConverged, type EstimationResult, type EstimatorOptions } from './moments';
import { buildSaomProblem, type ParameterInfo, type SaomProblemInput } from './problem';

export * from './methodOfMoments';
export * from './moments';
export { sampleMoments, type MomentSample } from './sampler';
export * from './problem';
export * from './checks';
export * from './scoreTest';
export {
  conditionNumber,
  correlationFromCovariance,
  inverse,
  sampleCovariance,
  solve,
  symmetricEigen,
  symmetricPseudoInverse,
  type Matrix,
} from '../linalg';

export interface FittedParameter extends ParameterInfo {
  /** The estimate, or the fixed value. */
  value: number;
  /** Standard error (null when fixed or not computable). */
  se: number | null;
  /** Convergence t-ratio of this parameter's statistic (null when fixed). */
  convergenceT: number | null;
}

export interface SaomFit {
  parameters: FittedParameter[];
  /** Estimated parameters only, in the order of the matrices below. */
  estimatedKeys: string[];
  covariance: number[][] | null;
  correlation: number[][] | null;
  tauMax: number;
  conditionNumber: number;
  converged: boolean;
  simulatedPeriods: number;
  phase2Iterations: number[];
  /** Phase 3 checks run: 1, or more when the fit continued automatically from its estimates. */
  rounds: number;
  warnings: string[];
  /** The raw estimator output, for tests and the bench. */
  raw: EstimationResult;
}

export type FitOptions = Omit<EstimatorOptions, 'start'> & { start?: number[] };

/** Builds the problem and runs the estimator. Throws EstimationCancelled / EstimationFailed like `estimate`. */
export function fitSaom(input: SaomProblemInput, options: FitOptions = {}): SaomFit {
  const built = buildSaomProblem(input);
  for (const note of built.notes) options.log?.(note);
  const result = estimate(built.problem, { ...options, start: options.start ?? built.start });
  const full = built.expand(result.theta);
  let e = 0;
  const parameters: FittedParameter[] = built.parameters.map((q) => {
    const value = q.kind === 'rate' ? full.rates[q.index] : full.params[q.index];
    if (!q.estimated) return { ...q, value, se: null, convergenceT: null };
    const se = result.standardErrors[e];
    const t = result.convergenceT[e];
    e++;
    return { ...q, value, se: Number.isFinite(se) ? se : null, convergenceT: Number.isFinite(t) ? t : null };
  });
  return {
    parameters,
    estimatedKeys: built.parameters.filter((q) => q.estimated).map((q) => q.key),
    covariance: result.covariance,
    correlation: result.correlation,
    tauMax: result.tauMax,
    conditionNumber: result.conditionNumber,
    converged: isConverged(result),
    simulatedPeriods: result.simulatedPeriods,
    phase2Iterations: result.phase2Iterations,
    rounds: result.rounds.length,
    warnings: [...built.notes, ...result.warnings],
    raw: result,
  };
}
