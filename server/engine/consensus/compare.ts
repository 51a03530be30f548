/**
 * Network comparison over a pair mask: matched, missed and extra ties, Jaccard index, precision, recall.
 *
 * Purpose: set a consensus network against the observed end wave, and give the persistence baseline
 * (the Jaccard index between the observed start and end waves) beside it.
 *
 * References:
 * - Jaccard, P. (1912). The distribution of the flora in the alpine zone. New Phytologist 11, 37-50.
 * - Snijders, T.A.B., van de Bunt, G.G. & Steglich, C.E.G. (2010). Introduction to stochastic
 *   actor-based models for network dynamics. Social Networks 32, 44-60. (wave-to-wave Jaccard index
 *   as a data diagnostic)
 * - Wavefit METHODS.md section 6.
 */
import { waveChange } from '../waveChange';
import type { PairMask } from './consensus';

export interface NetworkComparison {
  /** Pairs taking part (free, not missing, off-diagonal). */
  pairs: number;
  /** Ties in both (matched). */
  tp: number;
  /** Ties predicted but not observed (extra). */
  fp: number;
  /** Ties observed but not predicted (missed). */
  fn: number;
  /** Absent in both. */
  tn: number;
  /** TP / (TP + FP + FN); null when both networks are empty on the mask. */
  jaccard: number | null;
  /** TP / (TP + FP); null when nothing is predicted. */
  precision: number | null;
  /** TP / (TP + FN); null when nothing is observed. */
  recall: number | null;
}

/**
 * Compare `predicted` with `observed` (row-major 0/1, n x n) over the pairs of the mask.
 * Observed entries other than 0 and 1 (e.g. a missing code) must be masked out; otherwise they throw.
 */
export function compareNetworks(
  n: number,
  predicted: ArrayLike<number>,
  observed: ArrayLike<number>,
  mask?: PairMask,
): NetworkComparison {
  if (predicted.length !== n * n || observed.length !== n * n) {
    throw new Error(`network-compare: networks on ${n} actors have ${n * n} entries, got ${predicted.length} and ${observed.length}`);
  }
  if (mask && mask.length !== n * n) throw new Error(`network-compare: a pair mask for ${n} actors has ${n * n} entries, got ${mask.length}`);
  let tp = 0;
  let fp = 0;
  let fn = 0;
  let tn = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j) continue;
      const k = i * n + j;
      if (mask && !mask[k]) continue;
      const c = predicted[k];
      const y = observed[k];
      if ((c !== 0 && c !== 1) || (y !== 0 && y !== 1)) {
        throw new Error(`network-compare: pair (${i}, ${j}) is neither 0 nor 1 (${String(c)}, ${String(y)}); mask it out`);
      }
      if (c && y) tp++;
      else if (c) fp++;
      else if (y) fn++;
      else tn++;
    }
  }
  return {
    pairs: tp + fp + fn + tn,
    tp,
    fp,
    fn,
    tn,
    jaccard: tp + fp + fn > 0 ? tp / (tp + fp + fn) : null,
    precision: tp + fp > 0 ? tp / (tp + fp) : null,
    recall: tp + fn > 0 ? tp / (tp + fn) : null,
  };
}

/** The persistence baseline J(x(t_m), x(t_m+1)) over the mask: the Jaccard index of two observed waves. */
export function persistenceJaccard(n: number, start: ArrayLike<number>, end: ArrayLike<number>, mask?: PairMask): number | null {
  return waveChange(n, start, end, { mask }).jaccard;
}
