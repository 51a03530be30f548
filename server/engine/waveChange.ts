/**
 * Wave-to-wave change: which ties last, appear and disappear between two observations of a network,
 * and the Jaccard index of the two tie sets.
 *
 * Purpose: the one count of change used by the data summaries, the estimator's pre-fit checks and
 * the batches' persistence baseline, with the one caution threshold (JACCARD_CAUTION, shared/data.ts).
 *
 * References:
 * - Jaccard, P. (1912). The distribution of the flora in the alpine zone. New Phytologist 11, 37-50.
 * - Snijders, T.A.B., van de Bunt, G.G. & Steglich, C.E.G. (2010). Introduction to stochastic
 *   actor-based models for network dynamics. Social Networks 32, 44-60. (the Jaccard index between
 *   waves as a data diagnostic; below about 0.2 is problematic, from memory)
 */
export { JACCARD_CAUTION } from '../../shared/data';

export interface WaveChangeCounts {
  /** Off-diagonal pairs counted (inside the mask, not missing in either wave). */
  pairs: number;
  /** Ties present in both waves. */
  stable: number;
  /** Ties absent in the first wave and present in the second. */
  created: number;
  /** Ties present in the first wave and absent in the second. */
  dissolved: number;
  /** stable / (stable + created + dissolved); null when neither wave has a tie on the counted pairs. */
  jaccard: number | null;
}

export interface WaveChangeOptions {
  /** Count only pairs k with mask[k] !== 0. */
  mask?: ArrayLike<number>;
  /** A value meaning "not observed": pairs with it in either wave are not counted. */
  missing?: number;
}

/** Change from `from` to `to` (row-major n x n; 0 no tie, 1 tie, and the optional missing code). */
export function waveChange(n: number, from: ArrayLike<number>, to: ArrayLike<number>, options: WaveChangeOptions = {}): WaveChangeCounts {
  const { mask, missing } = options;
  if (from.length !== n * n || to.length !== n * n) {
    throw new Error(`wave-change: networks on ${n} actors have ${n * n} entries, got ${from.length} and ${to.length}`);
  }
  if (mask && mask.length !== n * n) throw new Error(`wave-change: a pair mask for ${n} actors has ${n * n} entries, got ${mask.length}`);
  let pairs = 0;
  let stable = 0;
  let created = 0;
  let dissolved = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j) continue;
      const k = i * n + j;
      if (mask && !mask[k]) continue;
      const x = from[k];
      const y = to[k];
      if (missing !== undefined && (x === missing || y === missing)) continue;
      if ((x !== 0 && x !== 1) || (y !== 0 && y !== 1)) {
        throw new Error(`wave-change: pair (${i}, ${j}) is neither 0 nor 1 (${String(x)}, ${String(y)}); mask it out`);
      }
      pairs++;
      if (x && y) stable++;
      else if (y) created++;
      else if (x) dissolved++;
    }
  }
  const union = stable + created + dissolved;
  return { pairs, stable, created, dissolved, jaccard: union > 0 ? stable / union : null };
}
