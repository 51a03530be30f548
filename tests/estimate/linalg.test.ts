/**
 * The estimator's small linear algebra against numpy (Debian python3-numpy, called with /usr/bin/python3):
 * solve, inverse, symmetric eigenvalues, Moore-Penrose pseudo-inverse (Penrose 1955), the 2-norm
 * condition number (Golub & Van Loan 2013, 2.6) and the sample covariance with N - 1 denominator.
 */
import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import {
  conditionNumber,
  correlationFromCovariance,
  inverse,
  sampleCovariance,
  solve,
  symmetricEigen,
  symmetricPseudoInverse,
  type Matrix,
} from '../../server/engine/linalg';
import { createRng } from '../../server/engine/prng';

function numpy<T>(code: string, input: unknown): T {
  const script = `import json, sys\nimport numpy as np\ndata = json.load(sys.stdin)\n${code}\n`;
  const out = execFileSync('/usr/bin/python3', ['-c', script], { input: JSON.stringify(input), encoding: 'utf8' });
  return JSON.parse(out) as T;
}

function randomMatrix(seed: number, rows: number, cols = rows): Matrix {
  const rng = createRng(seed);
  return Array.from({ length: rows }, () => Array.from({ length: cols }, () => rng.nextDouble() * 4 - 2));
}

function expectClose(a: Matrix | number[], b: Matrix | number[], tol: number): void {
  const fa = (a as unknown[]).flat(2) as number[];
  const fb = (b as unknown[]).flat(2) as number[];
  expect(fa.length).toBe(fb.length);
  fa.forEach((v, k) => expect(Math.abs(v - fb[k])).toBeLessThan(tol * Math.max(1, Math.abs(fb[k]))));
}

describe('linear algebra against numpy', () => {
  const a = randomMatrix(11, 6);
  const b = [1, -2, 0.5, 3, 0, 1.5];
  // A symmetric positive semi-definite matrix of rank 3 (6 x 6), like the covariance of dependent statistics.
  const g = randomMatrix(12, 6, 3);
  const psd = g.map((ri) => g.map((rj) => ri.reduce((s, v, k) => s + v * rj[k], 0)));

  const ref = numpy<{ solve: number[]; inv: Matrix; eig: number[]; pinv: Matrix; cond: number; cov: Matrix; corr: Matrix }>(
    `A = np.array(data["a"]); b = np.array(data["b"]); S = np.array(data["psd"]); X = np.array(data["x"])
print(json.dumps({"solve": np.linalg.solve(A, b).tolist(), "inv": np.linalg.inv(A).tolist(),
  "eig": sorted(np.linalg.eigvalsh(S).tolist(), reverse=True), "pinv": np.linalg.pinv(S, rcond=1e-10, hermitian=True).tolist(),
  "cond": float(np.linalg.cond(A)), "cov": np.cov(X, rowvar=False).tolist(), "corr": np.corrcoef(X, rowvar=False).tolist()}))`,
    { a, b, psd, x: randomMatrix(13, 20, 4) },
  );

  it('solves and inverts like numpy.linalg', () => {
    expectClose(solve(a, b), ref.solve, 1e-10);
    expectClose(inverse(a), ref.inv, 1e-10);
  });

  it('finds the eigenvalues of a symmetric matrix like numpy.linalg.eigvalsh', () => {
    expectClose(symmetricEigen(psd).values, ref.eig, 1e-9);
  });

  it('gives the pseudo-inverse of a rank-deficient covariance like numpy.linalg.pinv', () => {
    const { inverse: pinv, rank } = symmetricPseudoInverse(psd);
    expect(rank).toBe(3);
    expectClose(pinv, ref.pinv, 1e-7);
  });

  it('gives the 2-norm condition number like numpy.linalg.cond', () => {
    expect(conditionNumber(a) / ref.cond).toBeCloseTo(1, 8);
  });

  it('gives the sample covariance and correlation like numpy.cov / corrcoef', () => {
    const { cov } = sampleCovariance(randomMatrix(13, 20, 4));
    expectClose(cov, ref.cov, 1e-12);
    expectClose(correlationFromCovariance(cov), ref.corr, 1e-12);
  });

  it('refuses a singular matrix with a clear message', () => {
    const singular = [
      [1, 2],
      [2, 4],
    ];
    expect(() => inverse(singular)).toThrow(/singular/);
    expect(() => solve(singular, [1, 1])).toThrow(/singular/);
    expect(conditionNumber(singular)).toBe(Infinity);
  });
});
