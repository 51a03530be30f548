/**
 * Sample quantiles by linear interpolation between order statistics (Hyndman & Fan type 7).
 *
 * Purpose: the envelope bands of goodness of fit, with one stated quantile rule.
 *
 * References:
 * - Hyndman, R.J. & Fan, Y. (1996). Sample quantiles in statistical packages.
 *   The American Statistician 50, 361-365. (definition 7: h = (N - 1) p, Q = x_(floor h) + (h - floor h)(x_(floor h + 1) - x_(floor h)))
 */

function checkProbability(p: number): void {
  if (!(p >= 0 && p <= 1)) throw new Error(`quantiles: a probability must lie in [0, 1], got ${String(p)}`);
}

/**
 * The type-7 quantile of an ascending sorted sample.
 * @throws Error("quantiles: ...") for an empty sample, a probability outside [0, 1] or a NaN value
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) throw new Error('quantiles: the sample is empty');
  checkProbability(p);
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, n - 1);
  const a = sorted[lo];
  const b = sorted[hi];
  if (Number.isNaN(a) || Number.isNaN(b)) throw new Error('quantiles: the sample contains NaN');
  const frac = h - lo;
  // a + frac (b - a) is exact at frac = 0 and stays inside [a, b].
  return frac === 0 ? a : a + frac * (b - a);
}

/** A sorted copy (numeric order) as a Float64Array; NaN is refused. */
export function sortedCopy(values: ArrayLike<number>): Float64Array {
  const out = Float64Array.from(values as ArrayLike<number>);
  for (let k = 0; k < out.length; k++) {
    if (Number.isNaN(out[k])) throw new Error(`quantiles: value ${k} is NaN`);
  }
  out.sort(); // typed-array sort is numeric
  return out;
}

/** Type-7 quantiles of an unsorted sample at several probabilities (the sample is copied, not changed). */
export function quantiles(values: ArrayLike<number>, probabilities: ReadonlyArray<number>): number[] {
  for (const p of probabilities) checkProbability(p);
  const sorted = sortedCopy(values);
  return probabilities.map((p) => quantileSorted(sorted, p));
}
