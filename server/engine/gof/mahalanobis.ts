/**
 * Mahalanobis-distance goodness-of-fit test of one auxiliary statistic vector against simulations.
 *
 * Purpose: one number per statistic saying how unusual the observed vector is among the simulated ones,
 * with linear dependencies and constant components handled explicitly.
 *
 * References:
 * - Mahalanobis, P.C. (1936). On the generalised distance in statistics. Proceedings of the National
 *   Institute of Sciences of India 2, 49-55.
 * - Penrose, R. (1955). A generalized inverse for matrices. Proceedings of the Cambridge Philosophical
 *   Society 51, 406-413. (the Moore-Penrose inverse)
 * - Golub, G.H. & Van Loan, C.F. (2013). Matrix Computations, 4th ed., section 8.5 (the cyclic Jacobi
 *   method for the symmetric eigenproblem; implemented once for the engine in ../linalg.ts).
 * - North, B.V., Curtis, D. & Sham, P.C. (2002). A note on the calculation of empirical P values from
 *   Monte Carlo procedures. American Journal of Human Genetics 71, 439-441. (p = (1 + r)/(N + 1))
 * - Lospinoso, J. & Snijders, T.A.B. (2019). Goodness of fit for stochastic actor-oriented models.
 *   Methodological Innovations 12(3), 1-18. (the test applied to simulated auxiliary statistics)
 * - Wavefit METHODS.md section 5 (zero-variance components and the out-of-support flag are our own).
 */
import { sampleCovariance, symmetricEigen as linalgSymmetricEigen, symmetricPseudoInverse, type Matrix } from '../linalg';

/** A simulated sample: N rows of p numbers, row-major. */
export interface SampleMatrix {
  rows: number;
  cols: number;
  data: Float64Array;
}

export function sampleMatrix(rows: ReadonlyArray<ArrayLike<number>>): SampleMatrix {
  const n = rows.length;
  const p = n > 0 ? rows[0].length : 0;
  const data = new Float64Array(n * p);
  rows.forEach((row, s) => {
    if (row.length !== p) throw new Error(`mahalanobis: row ${s} has ${row.length} values, expected ${p}`);
    for (let k = 0; k < p; k++) data[s * p + k] = row[k];
  });
  return { rows: n, cols: p, data };
}

/** The rows of a sample as views into its data (no copy). */
function rowViews(sample: SampleMatrix): Float64Array[] {
  const { rows: n, cols: p, data } = sample;
  return Array.from({ length: n }, (_, s) => data.subarray(s * p, (s + 1) * p));
}

/** A row-major p x p matrix as rows. */
function toRows(matrix: ArrayLike<number>, p: number): Matrix {
  return Array.from({ length: p }, (_, i) => Array.from({ length: p }, (_, j) => matrix[i * p + j]));
}

/** A row-major p x p matrix as rows, after checking its size and that every entry is finite. */
function checkedRows(matrix: ArrayLike<number>, p: number): Matrix {
  if (matrix.length !== p * p) throw new Error(`mahalanobis: a ${p} x ${p} matrix has ${p * p} entries, got ${matrix.length}`);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) {
      if (!Number.isFinite(matrix[i * p + j])) throw new Error(`mahalanobis: matrix entry (${i}, ${j}) is not finite`);
    }
  }
  return toRows(matrix, p);
}

/** Rows back to a row-major p x p matrix. */
function toFlat(rows: Matrix, p: number): Float64Array {
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) out[i * p + j] = rows[i][j];
  return out;
}

/**
 * Column means and the sample covariance with the N - 1 denominator (p x p, row-major), computed by
 * the engine's one linear-algebra module (../linalg.ts).
 */
export function meanAndCovariance(sample: SampleMatrix): { mean: Float64Array; covariance: Float64Array } {
  const { rows: n, cols: p } = sample;
  if (n < 2) throw new Error(`mahalanobis: a covariance needs at least 2 simulated vectors, got ${n}`);
  if (p === 0) return { mean: new Float64Array(0), covariance: new Float64Array(0) };
  const { mean, cov } = sampleCovariance(rowViews(sample));
  return { mean: Float64Array.from(mean), covariance: toFlat(cov, p) };
}

/**
 * Eigenvalues and eigenvectors of a symmetric row-major p x p matrix (cyclic Jacobi rotations, in
 * ../linalg.ts). Returns values in descending order and the vectors as the columns of a row-major
 * p x p matrix.
 */
export function symmetricEigen(matrix: ArrayLike<number>, p: number): { values: Float64Array; vectors: Float64Array } {
  const eigen = linalgSymmetricEigen(checkedRows(matrix, p));
  const values = Float64Array.from(eigen.values);
  const vectors = new Float64Array(p * p);
  eigen.vectors.forEach((u, e) => {
    for (let k = 0; k < p; k++) vectors[k * p + e] = u[k];
  });
  return { values, vectors };
}

/** The default relative eigenvalue cut-off of the Moore-Penrose inverse (METHODS.md section 5). */
export const DEFAULT_EIGEN_TOLERANCE = 1e-10;

/**
 * The Moore-Penrose inverse of a symmetric positive semi-definite row-major matrix: sum over
 * eigenvalues lambda > tol * lambda_max of u u' / lambda (../linalg.ts). Also returns how many
 * eigenvalues were kept.
 */
export function pseudoInverseSymmetric(
  matrix: ArrayLike<number>,
  p: number,
  tolerance = DEFAULT_EIGEN_TOLERANCE,
): { inverse: Float64Array; rank: number } {
  const { inverse, rank } = symmetricPseudoInverse(checkedRows(matrix, p), tolerance);
  return { inverse: toFlat(inverse, p), rank };
}

export interface OutOfSupport {
  /** Index of the component in the statistic vector. */
  component: number;
  observed: number;
  /** The one value every simulation gave. */
  simulated: number;
}

export interface MahalanobisResult {
  /** Number of simulated vectors N. */
  chains: number;
  /** Length of the statistic vector. */
  components: number;
  /** Indices of components whose simulated values were all equal (left out of the distance). */
  constantComponents: number[];
  /** Constant components where the observed value differs from the constant. */
  outOfSupport: OutOfSupport[];
  /** Eigenvalues kept in the pseudo-inverse (the effective dimension of the test). */
  componentsKept: number;
  /** Mean of the simulated vectors (all components). */
  mean: number[];
  /** (a_obs - mean)' S+ (a_obs - mean) over the varying components. */
  distanceObserved: number;
  /** The same distance for every simulated vector, in input order. */
  distancesSimulated: Float64Array;
  /** (1 + #{s : d_s >= d_obs}) / (N + 1). */
  pValue: number;
  /**
   * Share of the observed deviation's squared length that lies outside the span of the simulated
   * covariance (ignored by the pseudo-inverse). Near 0 when the observed vector obeys the same linear
   * identities as the simulated ones.
   */
  outsideSpanShare: number;
}

export interface MahalanobisOptions {
  /** Relative eigenvalue cut-off (default 1e-10). */
  tolerance?: number;
  /**
   * Which vectors give the mean and covariance: 'simulated' (the N simulated ones, as METHODS.md 5 and
   * Lospinoso & Snijders 2019; the default) or 'pooled' (the N simulated and the observed one, so all
   * N + 1 vectors are treated alike and the rank of the observed distance is exactly uniform when the
   * observed network comes from the model; our own variant, see tests/gof/calibration.test.ts).
   */
  reference?: 'simulated' | 'pooled';
}

/**
 * The Mahalanobis test of METHODS.md section 5: mean and sample covariance of the simulated vectors,
 * constant components dropped (with an out-of-support flag when the observed value differs), the
 * Moore-Penrose inverse, the distances of the observed and every simulated vector, and the Monte Carlo
 * p-value (1 + #{d_s >= d_obs})/(N + 1). Simulated distances within a relative 1e-12 of d_obs count as
 * ties (as large), which errs towards the larger p-value.
 */
export function mahalanobisTest(
  simulated: SampleMatrix,
  observed: ArrayLike<number>,
  options: MahalanobisOptions = {},
): MahalanobisResult {
  const { rows: n, cols: p, data } = simulated;
  if (observed.length !== p) {
    throw new Error(`mahalanobis: the observed vector has ${observed.length} values, the simulated ones ${p}`);
  }
  if (n < 2) throw new Error(`mahalanobis: the test needs at least 2 simulated vectors, got ${n}`);
  if (data.length !== n * p) throw new Error(`mahalanobis: ${n} x ${p} sample has ${data.length} values`);
  for (let k = 0; k < data.length; k++) {
    if (!Number.isFinite(data[k])) throw new Error(`mahalanobis: simulated value ${k} is not finite`);
  }
  for (let k = 0; k < p; k++) {
    if (!Number.isFinite(observed[k])) throw new Error(`mahalanobis: observed component ${k} is not finite`);
  }
  const tolerance = options.tolerance ?? DEFAULT_EIGEN_TOLERANCE;

  // Constant components (exactly equal in every simulation).
  const varying: number[] = [];
  const constantComponents: number[] = [];
  const outOfSupport: OutOfSupport[] = [];
  for (let k = 0; k < p; k++) {
    const first = data[k];
    let constant = true;
    for (let s = 1; s < n; s++) {
      if (data[s * p + k] !== first) {
        constant = false;
        break;
      }
    }
    if (constant) {
      constantComponents.push(k);
      if (observed[k] !== first) outOfSupport.push({ component: k, observed: observed[k], simulated: first });
    } else {
      varying.push(k);
    }
  }
  const q = varying.length;
  const reduced = new Float64Array(n * q);
  for (let s = 0; s < n; s++) for (let c = 0; c < q; c++) reduced[s * q + c] = data[s * p + varying[c]];
  const full = meanAndCovariance({ rows: n, cols: p, data });
  let reference: SampleMatrix = { rows: n, cols: q, data: reduced };
  if (options.reference === 'pooled') {
    const pooled = new Float64Array((n + 1) * q);
    pooled.set(reduced);
    for (let c = 0; c < q; c++) pooled[n * q + c] = observed[varying[c]];
    reference = { rows: n + 1, cols: q, data: pooled };
  }
  const { mean, covariance } = meanAndCovariance(reference);

  const distancesSimulated = new Float64Array(n);
  let distanceObserved = 0;
  let componentsKept = 0;
  let outsideSpanShare = 0;
  if (q > 0) {
    const { values, vectors } = symmetricEigen(covariance, q);
    const lambdaMax = values[0];
    const kept: number[] = [];
    if (lambdaMax > 0) for (let e = 0; e < q; e++) if (values[e] > tolerance * lambdaMax) kept.push(e);
    componentsKept = kept.length;
    // d(a) = sum over kept e of (u_e' (a - mean))^2 / lambda_e.
    const dev = new Float64Array(q);
    const distance = (get: (c: number) => number): number => {
      for (let c = 0; c < q; c++) dev[c] = get(c) - mean[c];
      let d = 0;
      for (const e of kept) {
        let z = 0;
        for (let c = 0; c < q; c++) z += vectors[c * q + e] * dev[c];
        d += (z * z) / values[e];
      }
      return d;
    };
    for (let s = 0; s < n; s++) distancesSimulated[s] = distance((c) => reduced[s * q + c]);
    distanceObserved = distance((c) => observed[varying[c]]);
    // Part of the observed deviation outside the kept eigenvectors.
    let total = 0;
    let inside = 0;
    for (let c = 0; c < q; c++) total += dev[c] * dev[c];
    for (const e of kept) {
      let z = 0;
      for (let c = 0; c < q; c++) z += vectors[c * q + e] * dev[c];
      inside += z * z;
    }
    outsideSpanShare = total > 0 ? Math.max(0, (total - inside) / total) : 0;
  }
  const threshold = distanceObserved * (1 - 1e-12);
  let atLeast = 0;
  for (let s = 0; s < n; s++) if (distancesSimulated[s] >= threshold) atLeast++;
  return {
    chains: n,
    components: p,
    constantComponents,
    outOfSupport,
    componentsKept,
    mean: Array.from(full.mean),
    distanceObserved,
    distancesSimulated,
    pValue: (1 + atLeast) / (n + 1),
    outsideSpanShare,
  };
}
