/**
 * The sampler of the method of moments: a counted, checked simulator of the statistics and the
 * finite-difference derivative matrix with common random numbers (METHODS.md 4.2.1).
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics. Sociological
 *   Methodology 31, 361-395. (finite differences with common random numbers)
 */
import { sampleCovariance, zeros, type Matrix } from '../linalg';
import { EstimationCancelled, EstimationFailed, type MomentProblem, type Progress } from './moments';

export function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return Math.abs(x) >= 1000 || (Math.abs(x) < 0.001 && x !== 0) ? x.toExponential(3) : x.toFixed(4);
}

export function fmtVec(v: ReadonlyArray<number>): string {
  return `(${v.map(fmt).join(', ')})`;
}

export interface Runner {
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
  /** Sums of the squared per-run difference quotients (for pooling over several samples). */
  sumSquares: Matrix;
  /** Runs that had finite differences (the first ones). */
  derivativeRuns: number;
}

export interface SampleOptions {
  /** Finite differences on the first this many runs only (default all). */
  derivativeRuns?: number;
  progressPhase?: 1 | 3;
  progressSubphase?: number;
}

export interface SamplerContext {
  epsilon: number;
  cancelled: () => boolean;
  progress: (progress: Progress) => void;
  failure: (reason: string) => Error;
}

/** A counted, checked simulator and the finite-difference sampler of METHODS 4.2.1 over it. */
export function createSampler(problem: MomentProblem, ctx: SamplerContext) {
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
  /**
   * N runs at theta (streams keyed by `phase`) with finite differences on common random numbers
   * (METHODS 4.2.1) on the first `derivativeRuns` of them.
   */
  const sample = (theta: number[], phase: number, runs: number, options: SampleOptions = {}): MomentSample => {
    const zs: number[][] = [];
    const d = zeros(p);
    const d2 = zeros(p);
    const withD = Math.min(runs, options.derivativeRuns ?? runs);
    const progressPhase = options.progressPhase ?? (phase === 1 ? 1 : 3);
    const progressSubphase = options.progressSubphase ?? 0;
    for (let s = 0; s < runs; s++) {
      const z0 = runner.run(theta, phase, s);
      zs.push(z0);
      if (s < withD) for (let l = 0; l < p; l++) {
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
      ctx.progress({ phase: progressPhase, subphase: progressSubphase, iteration: s + 1, planned: runs, theta: theta.slice() });
    }
    // Mean and its Monte Carlo standard error per entry.
    const se = zeros(p);
    for (let k = 0; k < p; k++) {
      for (let l = 0; l < p; l++) {
        const mean = d[k][l] / withD;
        const variance = withD > 1 ? Math.max(0, (d2[k][l] - withD * mean * mean) / (withD - 1)) : NaN;
        d[k][l] = mean;
        se[k][l] = Math.sqrt(variance / withD);
      }
    }
    return { zs, d, se, sumSquares: d2, derivativeRuns: withD };
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
