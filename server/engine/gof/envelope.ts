/**
 * Envelopes: pointwise quantile bands of simulated auxiliary statistic vectors.
 *
 * Purpose: per component, the range where the central share (the coverage) of the simulated values
 * falls, to set the observed values against. Pointwise: no correction for looking at many components.
 *
 * References:
 * - Hyndman, R.J. & Fan, Y. (1996). Sample quantiles in statistical packages. The American
 *   Statistician 50, 361-365. (quantile rule 7, see quantiles.ts)
 * - Lospinoso, J. & Snijders, T.A.B. (2019). Goodness of fit for stochastic actor-oriented models.
 *   Methodological Innovations 12(3), 1-18. (simulated bands set against observed statistics)
 */
import type { SampleMatrix } from './mahalanobis';
import { quantileSorted } from './quantiles';

export interface EnvelopeBand {
  /** Central share covered, e.g. 0.9 for the band between the 5% and 95% quantiles. */
  coverage: number;
  lower: number[];
  upper: number[];
}

export interface Envelope {
  components: number;
  chains: number;
  mean: number[];
  median: number[];
  min: number[];
  max: number[];
  /** One band per requested coverage, in the order requested. */
  bands: EnvelopeBand[];
}

/** The coverages shown by default: a narrow 50% band and a wide 90% band. */
export const DEFAULT_COVERAGES: readonly number[] = [0.5, 0.9];

/**
 * Pointwise type-7 quantile bands at (1 - coverage)/2 and (1 + coverage)/2 for every component.
 * @throws Error("envelope: ...") for no simulations or a coverage outside (0, 1]
 */
export function envelope(sample: SampleMatrix, coverages: ReadonlyArray<number> = DEFAULT_COVERAGES): Envelope {
  const { rows: n, cols: p, data } = sample;
  if (n < 1) throw new Error('envelope: there are no simulated vectors');
  for (const g of coverages) {
    if (!(g > 0 && g <= 1)) throw new Error(`envelope: a coverage must lie in (0, 1], got ${String(g)}`);
  }
  const mean: number[] = [];
  const median: number[] = [];
  const min: number[] = [];
  const max: number[] = [];
  const bands: EnvelopeBand[] = coverages.map((coverage) => ({ coverage, lower: [], upper: [] }));
  const column = new Float64Array(n);
  for (let k = 0; k < p; k++) {
    let sum = 0;
    for (let s = 0; s < n; s++) {
      const v = data[s * p + k];
      if (Number.isNaN(v)) throw new Error(`envelope: simulated value (${s}, ${k}) is NaN`);
      column[s] = v;
      sum += v;
    }
    column.sort();
    mean.push(sum / n);
    median.push(quantileSorted(column, 0.5));
    min.push(column[0]);
    max.push(column[n - 1]);
    bands.forEach((band) => {
      band.lower.push(quantileSorted(column, (1 - band.coverage) / 2));
      band.upper.push(quantileSorted(column, (1 + band.coverage) / 2));
    });
  }
  return { components: p, chains: n, mean, median, min, max, bands };
}

/** Components whose observed value lies outside a band (strictly below lower or above upper). */
export function componentsOutside(band: EnvelopeBand, observed: ArrayLike<number>): number[] {
  if (observed.length !== band.lower.length) {
    throw new Error(`envelope: the observed vector has ${observed.length} values, the band ${band.lower.length}`);
  }
  const out: number[] = [];
  for (let k = 0; k < observed.length; k++) {
    if (observed[k] < band.lower[k] || observed[k] > band.upper[k]) out.push(k);
  }
  return out;
}
