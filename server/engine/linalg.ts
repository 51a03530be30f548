/**
 * Small dense linear algebra for the engine: solving, inverting, symmetric eigendecomposition,
 * pseudo-inverse, condition number and sample covariance of p x p matrices (p = number of estimated
 * parameters or statistic components, rarely above 50), on plain number[][] so results travel as
 * JSON unchanged.
 *
 * Purpose: the one copy of these algorithms, for the method of moments (Phases 1-3) and for the
 * Mahalanobis goodness-of-fit test (gof/mahalanobis.ts adapts its row-major arrays), with no dependency.
 *
 * References:
 * - Golub, G.H. & Van Loan, C.F. (2013). Matrix Computations, 4th ed. Johns Hopkins University Press.
 *   (LU with partial pivoting, section 3.4; cyclic Jacobi eigenvalue method, section 8.5; the 2-norm
 *   condition number as the ratio of extreme singular values, section 2.6)
 * - Penrose, R. (1955). A generalized inverse for matrices. Proceedings of the Cambridge
 *   Philosophical Society 51, 406-413. (pseudo-inverse of a symmetric matrix from its eigenpairs)
 */

export type Matrix = number[][];

function checkSquare(a: Matrix, what: string): number {
  const n = a.length;
  for (let i = 0; i < n; i++) {
    if (!Array.isArray(a[i]) || a[i].length !== n) {
      throw new Error(`linalg: ${what} must be square; row ${i} has ${a[i]?.length ?? 0} entries for ${n} rows`);
    }
  }
  return n;
}

export function zeros(rows: number, cols: number = rows): Matrix {
  return Array.from({ length: rows }, () => new Array<number>(cols).fill(0));
}

export function identity(n: number): Matrix {
  const m = zeros(n);
  for (let i = 0; i < n; i++) m[i][i] = 1;
  return m;
}

export function copyMatrix(a: Matrix): Matrix {
  return a.map((row) => row.slice());
}

export function transpose(a: Matrix): Matrix {
  const rows = a.length;
  const cols = rows ? a[0].length : 0;
  const t = zeros(cols, rows);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) t[j][i] = a[i][j];
  return t;
}

export function matMul(a: Matrix, b: Matrix): Matrix {
  const rows = a.length;
  const inner = b.length;
  const cols = inner ? b[0].length : 0;
  if (rows && a[0].length !== inner) {
    throw new Error(`linalg: cannot multiply a ${rows}x${a[0].length} by a ${inner}x${cols} matrix`);
  }
  const c = zeros(rows, cols);
  for (let i = 0; i < rows; i++) {
    const ai = a[i];
    const ci = c[i];
    for (let k = 0; k < inner; k++) {
      const v = ai[k];
      if (v === 0) continue;
      const bk = b[k];
      for (let j = 0; j < cols; j++) ci[j] += v * bk[j];
    }
  }
  return c;
}

export function matVec(a: Matrix, x: ArrayLike<number>): number[] {
  const out = new Array<number>(a.length).fill(0);
  for (let i = 0; i < a.length; i++) {
    let s = 0;
    for (let j = 0; j < x.length; j++) s += a[i][j] * x[j];
    out[i] = s;
  }
  return out;
}

/** LU factorisation with partial pivoting, PA = LU, packed in one matrix. */
interface LU {
  lu: Matrix;
  perm: number[];
  /** True when a pivot was exactly zero or negligible (relative to the largest entry). */
  singular: boolean;
}

function luFactor(a: Matrix): LU {
  const n = checkSquare(a, 'the matrix');
  const lu = copyMatrix(a);
  const perm = Array.from({ length: n }, (_, i) => i);
  let scale = 0;
  for (const row of lu) for (const v of row) {
    if (!Number.isFinite(v)) throw new Error('linalg: the matrix has a non-finite entry');
    scale = Math.max(scale, Math.abs(v));
  }
  const tiny = scale * n * 1e-14;
  let singular = scale === 0 && n > 0;
  for (let k = 0; k < n; k++) {
    let pivotRow = k;
    let best = Math.abs(lu[k][k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(lu[i][k]);
      if (v > best) {
        best = v;
        pivotRow = i;
      }
    }
    if (best <= tiny) {
      singular = true;
      continue;
    }
    if (pivotRow !== k) {
      [lu[k], lu[pivotRow]] = [lu[pivotRow], lu[k]];
      [perm[k], perm[pivotRow]] = [perm[pivotRow], perm[k]];
    }
    const pivot = lu[k][k];
    for (let i = k + 1; i < n; i++) {
      const f = lu[i][k] / pivot;
      lu[i][k] = f;
      if (f === 0) continue;
      for (let j = k + 1; j < n; j++) lu[i][j] -= f * lu[k][j];
    }
  }
  return { lu, perm, singular };
}

function luSolveVec({ lu, perm }: LU, b: ArrayLike<number>): number[] {
  const n = lu.length;
  const y = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let s = b[perm[i]];
    for (let j = 0; j < i; j++) s -= lu[i][j] * y[j];
    y[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i];
    for (let j = i + 1; j < n; j++) s -= lu[i][j] * y[j];
    y[i] = s / lu[i][i];
  }
  return y;
}

/** Solves A x = b. Throws "linalg: ... singular" when A has no inverse. */
export function solve(a: Matrix, b: ArrayLike<number>): number[] {
  const f = luFactor(a);
  if (f.singular) throw new Error('linalg: the matrix is singular, so the system has no unique solution');
  if (b.length !== a.length) throw new Error(`linalg: right-hand side has ${b.length} entries for ${a.length} rows`);
  return luSolveVec(f, b);
}

/** The inverse of A. Throws "linalg: ... singular" when there is none. */
export function inverse(a: Matrix): Matrix {
  const n = a.length;
  const f = luFactor(a);
  if (f.singular) throw new Error('linalg: the matrix is singular and has no inverse');
  const inv = zeros(n);
  const e = new Array<number>(n).fill(0);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    const col = luSolveVec(f, e);
    for (let i = 0; i < n; i++) inv[i][j] = col[i];
  }
  return inv;
}

export interface SymmetricEigen {
  /** Eigenvalues in decreasing order. */
  values: number[];
  /** vectors[k] is the unit eigenvector of values[k]. */
  vectors: number[][];
}

/**
 * Eigendecomposition of a symmetric matrix by the cyclic Jacobi method (Golub & Van Loan 2013, 8.5).
 * Accurate to machine precision for the small matrices used here. The input is symmetrised first.
 */
export function symmetricEigen(a: Matrix): SymmetricEigen {
  const n = checkSquare(a, 'the matrix');
  const m = zeros(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const v = 0.5 * (a[i][j] + a[j][i]);
      if (!Number.isFinite(v)) throw new Error('linalg: the matrix has a non-finite entry');
      m[i][j] = v;
    }
  }
  const v = identity(n);
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    let total = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        total += m[i][j] * m[i][j];
        if (i !== j) off += m[i][j] * m[i][j];
      }
    }
    if (off <= 1e-30 * total || off === 0) break;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = m[p][q];
        if (apq === 0) continue;
        const theta = (m[q][q] - m[p][p]) / (2 * apq);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < n; k++) {
          const mkp = m[k][p];
          const mkq = m[k][q];
          m[k][p] = c * mkp - s * mkq;
          m[k][q] = s * mkp + c * mkq;
        }
        for (let k = 0; k < n; k++) {
          const mpk = m[p][k];
          const mqk = m[q][k];
          m[p][k] = c * mpk - s * mqk;
          m[q][k] = s * mpk + c * mqk;
        }
        for (let k = 0; k < n; k++) {
          const vkp = v[k][p];
          const vkq = v[k][q];
          v[k][p] = c * vkp - s * vkq;
          v[k][q] = s * vkp + c * vkq;
        }
      }
    }
  }
  const order = Array.from({ length: n }, (_, i) => i).sort((x, y) => m[y][y] - m[x][x]);
  return {
    values: order.map((k) => m[k][k]),
    vectors: order.map((k) => v.map((row) => row[k])),
  };
}

/**
 * Moore-Penrose pseudo-inverse of a symmetric positive semi-definite matrix: eigenvalues at or below
 * tol * (largest eigenvalue) are treated as zero (Penrose 1955).
 */
export function symmetricPseudoInverse(a: Matrix, tol = 1e-10): { inverse: Matrix; rank: number } {
  const n = a.length;
  const { values, vectors } = symmetricEigen(a);
  const top = values.length ? Math.max(values[0], 0) : 0;
  const out = zeros(n);
  let rank = 0;
  for (let k = 0; k < n; k++) {
    if (!(values[k] > tol * top) || values[k] <= 0) continue;
    rank++;
    const inv = 1 / values[k];
    const u = vectors[k];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i][j] += inv * u[i] * u[j];
  }
  return { inverse: out, rank };
}

/** Singular values of a square matrix, in decreasing order (square roots of the eigenvalues of A'A). */
export function singularValues(a: Matrix): number[] {
  checkSquare(a, 'the matrix');
  const ata = matMul(transpose(a), a);
  return symmetricEigen(ata).values.map((x) => Math.sqrt(Math.max(x, 0)));
}

/**
 * 2-norm condition number sigma_max / sigma_min (Golub & Van Loan 2013, 2.6); Infinity for a singular
 * matrix. Computed through A'A, so values beyond about 1e7 are only indicative, which is enough to flag
 * collinear effects.
 */
export function conditionNumber(a: Matrix): number {
  if (a.length === 0) return 1;
  const s = singularValues(a);
  const smin = s[s.length - 1];
  if (!(smin > 0)) return Infinity;
  return s[0] / smin;
}

/** Sample means and covariance (denominator N - 1) of rows of observations. */
export function sampleCovariance(rows: ReadonlyArray<ArrayLike<number>>): { mean: number[]; cov: Matrix } {
  const count = rows.length;
  if (count < 2) throw new Error(`linalg: a sample covariance needs at least 2 observations, got ${count}`);
  const p = rows[0].length;
  const mean = new Array<number>(p).fill(0);
  for (const r of rows) for (let k = 0; k < p; k++) mean[k] += r[k];
  for (let k = 0; k < p; k++) mean[k] /= count;
  const cov = zeros(p);
  const d = new Array<number>(p);
  for (const r of rows) {
    for (let k = 0; k < p; k++) d[k] = r[k] - mean[k];
    for (let i = 0; i < p; i++) {
      const di = d[i];
      if (di === 0) continue;
      for (let j = i; j < p; j++) cov[i][j] += di * d[j];
    }
  }
  for (let i = 0; i < p; i++) {
    for (let j = i; j < p; j++) {
      cov[i][j] /= count - 1;
      cov[j][i] = cov[i][j];
    }
  }
  return { mean, cov };
}

/** Correlation matrix from a covariance matrix; a zero-variance coordinate gets NaN off the diagonal. */
export function correlationFromCovariance(cov: Matrix): Matrix {
  const n = cov.length;
  const sd = cov.map((row, i) => Math.sqrt(Math.max(row[i], 0)));
  const r = zeros(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j) r[i][j] = 1;
      else r[i][j] = sd[i] > 0 && sd[j] > 0 ? cov[i][j] / (sd[i] * sd[j]) : NaN;
    }
  }
  return r;
}
