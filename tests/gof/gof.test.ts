/**
 * Goodness-of-fit numbers checked against outside references:
 * - type-7 quantiles against numpy.quantile's default ("linear") and simple-statistics' quantileSorted,
 *   both documented as Hyndman & Fan (1996) type 7;
 * - Mahalanobis distances with the Moore-Penrose inverse against numpy.linalg.pinv (Debian python3-numpy),
 *   including singular covariances, constant components and more components than simulations;
 * - the toy example of METHODS.md 7e (our own worked example, checked by hand below).
 */
import { join } from 'node:path';
import { quantileSorted as ssQuantileSorted } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { createRng, type Rng } from '../../server/engine/prng';
import { envelope, componentsOutside } from '../../server/engine/gof/envelope';
import { mahalanobisTest, meanAndCovariance, sampleMatrix, symmetricEigen, pseudoInverseSymmetric } from '../../server/engine/gof/mahalanobis';
import { quantileSorted, quantiles } from '../../server/engine/gof/quantiles';
import { runPython } from './python';

const SCRIPT = join(__dirname, 'reference_gof.py');

interface MahalanobisCase {
  name: string;
  sim: number[][];
  obs: number[];
  reference?: 'simulated' | 'pooled';
}
interface Reference {
  quantiles: number[][];
  mahalanobis: { d_obs: number; d_sim: number[]; p: number; rank: number; constant: number[]; out_of_support: number[] }[];
}

function normal(rng: Rng): number {
  // Box-Muller; only used to make test inputs.
  const u = 1 - rng.nextDouble();
  const v = rng.nextDouble();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

function multinomialRow(rng: Rng, total: number, k: number): number[] {
  const row = new Array<number>(k).fill(0);
  for (let t = 0; t < total; t++) row[rng.nextInt(k)]++;
  return row;
}

function buildCases(): { quantileCases: { values: number[]; probs: number[] }[]; mCases: MahalanobisCase[] } {
  const rng = createRng(20240601);
  const probs = [0, 0.025, 0.05, 0.1, 0.25, 0.3333, 0.5, 0.6, 0.75, 0.9, 0.95, 0.975, 1];
  const quantileCases = [
    { values: [3, 6, 7, 8, 8, 9, 10, 13, 15, 16, 20], probs },
    { values: [42], probs },
    { values: [1, 2], probs },
    { values: Array.from({ length: 100 }, () => normal(rng)), probs },
    { values: Array.from({ length: 1001 }, () => rng.nextInt(7)), probs }, // many ties
    { values: Array.from({ length: 37 }, () => rng.nextDouble() * 1e6 - 5e5), probs },
  ];
  const mCases: MahalanobisCase[] = [];
  // a) full rank, correlated
  {
    const sim = Array.from({ length: 50 }, () => {
      const z = [normal(rng), normal(rng), normal(rng)];
      return [z[0], z[0] + 0.5 * z[1], 2 * z[2] - z[0]];
    });
    mCases.push({ name: 'full rank 3', sim, obs: [1.5, -0.3, 2.2] });
  }
  // b) multinomial counts: components sum to a constant (rank p - 1)
  {
    const sim = Array.from({ length: 40 }, () => multinomialRow(rng, 30, 5));
    mCases.push({ name: 'sum to constant', sim, obs: [10, 4, 6, 5, 5] });
    mCases.push({ name: 'sum to constant, observed off the constraint', sim, obs: [10, 4, 6, 5, 9] });
  }
  // c, d) a constant component, observed differs / equals
  {
    const sim = Array.from({ length: 30 }, () => [normal(rng), 7, normal(rng) * 3, rng.nextInt(5)]);
    mCases.push({ name: 'constant component, out of support', sim, obs: [0.2, 8, -1, 2] });
    mCases.push({ name: 'constant component, in support', sim, obs: [0.2, 7, -1, 2] });
  }
  // e) exact linear dependencies between columns
  {
    const sim = Array.from({ length: 60 }, () => {
      const a = normal(rng);
      const b = normal(rng);
      const c = normal(rng);
      const d = rng.nextInt(10);
      return [a, b, c, d, a + b, 2 * c];
    });
    mCases.push({ name: 'duplicated directions', sim, obs: [0.5, 0.5, -1, 4, 1, -2] });
  }
  // f) one component
  {
    const sim = Array.from({ length: 25 }, () => [rng.nextInt(20)]);
    mCases.push({ name: 'one component', sim, obs: [15] });
  }
  // g) more components than simulations (rank at most N - 1)
  {
    const sim = Array.from({ length: 12 }, () => Array.from({ length: 20 }, () => normal(rng)));
    mCases.push({ name: 'p > N', sim, obs: Array.from({ length: 20 }, () => normal(rng)) });
  }
  // h) observed equal to one simulated vector, integer data with ties among distances
  {
    const sim = Array.from({ length: 80 }, () => multinomialRow(rng, 6, 4));
    mCases.push({ name: 'integer data with ties', sim, obs: [...sim[17]] });
  }
  // i) very different scales (counts in the hundreds next to a proportion)
  {
    const sim = Array.from({ length: 70 }, () => {
      const m = 200 + rng.nextInt(60);
      const l = 2 * m + 100 + rng.nextInt(80);
      return [m, l - 2 * m, 1000 - m - (l - 2 * m), (2 * m) / l];
    });
    mCases.push({ name: 'mixed scales (dyad census-like)', sim, obs: [230, 150, 620, 460 / 610] });
  }
  // j) the pooled variant (mean and covariance from simulated and observed together)
  mCases.push({ ...mCases[0], name: 'pooled reference, full rank', reference: 'pooled' });
  mCases.push({ ...mCases[1], name: 'pooled reference, sum to constant', reference: 'pooled' });
  mCases.push({ ...mCases[3], name: 'pooled reference, constant component', reference: 'pooled' });
  return { quantileCases, mCases };
}

describe('type-7 quantiles (Hyndman & Fan 1996, definition 7)', () => {
  const { quantileCases, mCases } = buildCases();
  const reference = runPython<Reference>(SCRIPT, {
    quantiles: quantileCases,
    mahalanobis: mCases.map((c) => ({ sim: c.sim, obs: c.obs, tol: 1e-10, reference: c.reference ?? 'simulated' })),
  });

  it('match numpy.quantile (default method "linear" = type 7) on fixed and random samples', () => {
    quantileCases.forEach((c, k) => {
      const ours = quantiles(c.values, c.probs);
      ours.forEach((q, j) => expect(q).toBeCloseTo(reference.quantiles[k][j], 10));
    });
  });

  it('match simple-statistics quantileSorted (documented as type 7)', () => {
    for (const c of quantileCases) {
      const sorted = [...c.values].sort((a, b) => a - b);
      for (const p of c.probs) expect(quantileSorted(sorted, p)).toBeCloseTo(ssQuantileSorted(sorted, p), 10);
    }
  });

  it('give the hand-computed values of a small sample (common practice: h = (n-1)p)', () => {
    // 1,2,3,4: p = 0.5 -> h = 1.5 -> 2 + 0.5 (3 - 2) = 2.5; p = 0.25 -> h = 0.75 -> 1.75
    expect(quantileSorted([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantileSorted([1, 2, 3, 4], 0.25)).toBe(1.75);
    expect(quantileSorted([1, 2, 3, 4], 1)).toBe(4);
  });

  it('refuse an empty sample, a probability outside [0, 1] and NaN', () => {
    expect(() => quantileSorted([], 0.5)).toThrow(/quantiles: the sample is empty/);
    expect(() => quantileSorted([1, 2], 1.5)).toThrow(/quantiles: a probability/);
    expect(() => quantiles([1, NaN], [0.5])).toThrow(/NaN/);
  });

  describe('Mahalanobis distances with the Moore-Penrose inverse, against numpy.linalg.pinv', () => {
    mCases.forEach((c, k) => {
      it(c.name, () => {
        const ours = mahalanobisTest(sampleMatrix(c.sim), c.obs, { reference: c.reference });
        const ref = reference.mahalanobis[k];
        const scale = Math.max(1, ...ref.d_sim);
        expect(Math.abs(ours.distanceObserved - ref.d_obs)).toBeLessThan(1e-7 * Math.max(1, ref.d_obs));
        ours.distancesSimulated.forEach((d, s) => expect(Math.abs(d - ref.d_sim[s])).toBeLessThan(1e-7 * scale));
        expect(ours.pValue).toBeCloseTo(ref.p, 12);
        expect(ours.componentsKept).toBe(ref.rank);
        expect(ours.constantComponents).toEqual(ref.constant);
        expect(ours.outOfSupport.map((o) => o.component)).toEqual(ref.out_of_support);
      });
    });
  });
});

describe('Mahalanobis test: worked examples', () => {
  it('reproduces the toy example of METHODS.md 7e (our own example; d_obs = 3, each d_s = 1.5, p = 1/5)', () => {
    const sim = sampleMatrix([
      [0, 0],
      [2, 0],
      [0, 2],
      [2, 2],
    ]);
    const { mean, covariance } = meanAndCovariance(sim);
    expect(Array.from(mean)).toEqual([1, 1]);
    // covariance diag(4/3, 4/3) with the N - 1 denominator
    expect(covariance[0]).toBeCloseTo(4 / 3, 14);
    expect(covariance[3]).toBeCloseTo(4 / 3, 14);
    expect(covariance[1]).toBeCloseTo(0, 14);
    const r = mahalanobisTest(sim, [3, 1]);
    expect(r.distanceObserved).toBeCloseTo(3, 12);
    Array.from(r.distancesSimulated).forEach((d) => expect(d).toBeCloseTo(1.5, 12));
    expect(r.pValue).toBeCloseTo(1 / 5, 14);
    expect(r.componentsKept).toBe(2);
  });

  it('gives d = 0 and p = 1 when the observed vector is the simulated mean (METHODS.md 7e)', () => {
    const r = mahalanobisTest(sampleMatrix([[0, 0], [2, 0], [0, 2], [2, 2]]), [1, 1]);
    expect(r.distanceObserved).toBe(0);
    expect(r.pValue).toBe(1);
  });

  it('does not depend on a common scale factor of the statistic (METHODS.md 5: p does not depend on scaling)', () => {
    const rng = createRng(5);
    const rows = Array.from({ length: 30 }, () => [normal(rng), normal(rng) + 1, rng.nextInt(4)]);
    const a = mahalanobisTest(sampleMatrix(rows), [0.3, 2.1, 1]);
    const b = mahalanobisTest(sampleMatrix(rows.map((r) => r.map((v) => 1000 * v))), [300, 2100, 1000]);
    expect(b.distanceObserved).toBeCloseTo(a.distanceObserved, 8);
    expect(b.pValue).toBe(a.pValue);
  });

  it('flags out of support and still tests the varying components when all but one are constant', () => {
    const r = mahalanobisTest(sampleMatrix([[1, 5], [1, 6], [1, 7]]), [2, 6]);
    expect(r.outOfSupport).toEqual([{ component: 0, observed: 2, simulated: 1 }]);
    expect(r.componentsKept).toBe(1);
    expect(r.distanceObserved).toBe(0);
  });

  it('handles a statistic that never varies: nothing to test, p = 1', () => {
    const r = mahalanobisTest(sampleMatrix([[4, 0], [4, 0], [4, 0]]), [4, 0]);
    expect(r.componentsKept).toBe(0);
    expect(r.pValue).toBe(1);
    expect(r.outOfSupport).toEqual([]);
  });

  it('refuses fewer than 2 simulations, a wrong observed length and non-finite values', () => {
    expect(() => mahalanobisTest(sampleMatrix([[1, 2]]), [1, 2])).toThrow(/at least 2/);
    expect(() => mahalanobisTest(sampleMatrix([[1, 2], [2, 3]]), [1])).toThrow(/observed vector has 1 values/);
    expect(() => mahalanobisTest(sampleMatrix([[1, 2], [2, NaN]]), [1, 2])).toThrow(/not finite/);
  });

  it('Jacobi eigenvectors reconstruct the matrix and the pseudo-inverse satisfies A A+ A = A (Penrose 1955)', () => {
    const rng = createRng(77);
    const p = 12;
    const rows = Array.from({ length: 9 }, () => Array.from({ length: p }, () => normal(rng))); // rank <= 8
    const { covariance } = meanAndCovariance(sampleMatrix(rows));
    const { values, vectors } = symmetricEigen(covariance, p);
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < p; j++) {
        let s = 0;
        for (let e = 0; e < p; e++) s += vectors[i * p + e] * values[e] * vectors[j * p + e];
        expect(s).toBeCloseTo(covariance[i * p + j], 10);
      }
    }
    const { inverse, rank } = pseudoInverseSymmetric(covariance, p);
    expect(rank).toBe(8);
    const mul = (a: Float64Array, b: Float64Array) => {
      const out = new Float64Array(p * p);
      for (let i = 0; i < p; i++) for (let k = 0; k < p; k++) for (let j = 0; j < p; j++) out[i * p + j] += a[i * p + k] * b[k * p + j];
      return out;
    };
    const aapa = mul(mul(covariance, inverse), covariance);
    aapa.forEach((v, k) => expect(v).toBeCloseTo(covariance[k], 9));
  });
});

describe('envelopes', () => {
  it('are the type-7 quantiles of each component at (1 -/+ coverage)/2 (Hyndman & Fan 1996)', () => {
    const rows = Array.from({ length: 21 }, (_, s) => [s, 20 - s, s % 5]);
    const env = envelope(sampleMatrix(rows), [0.5, 0.9]);
    // Component 0 is 0..20: quantile at p is 20 p exactly.
    expect(env.bands[0].lower[0]).toBeCloseTo(5, 12);
    expect(env.bands[0].upper[0]).toBeCloseTo(15, 12);
    expect(env.bands[1].lower[0]).toBeCloseTo(1, 12);
    expect(env.bands[1].upper[0]).toBeCloseTo(19, 12);
    expect(env.median).toEqual([10, 10, 2]);
    expect(env.mean[0]).toBeCloseTo(10, 12);
    expect(componentsOutside(env.bands[1], [0, 10, 2])).toEqual([0]);
    expect(componentsOutside(env.bands[0], [5, 15, 4])).toEqual([2]);
  });

  it('refuses a coverage outside (0, 1] and an empty sample', () => {
    expect(() => envelope(sampleMatrix([[1]]), [0])).toThrow(/coverage/);
    expect(() => envelope(sampleMatrix([]), [0.5])).toThrow(/no simulated/);
  });
});
