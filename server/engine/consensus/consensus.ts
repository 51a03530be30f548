/**
 * Consensus network: the ties that a given share of the simulated end networks agree on.
 *
 * Purpose: a single descriptive picture of what the model predicts for the end of a period, either
 * at a frequency threshold tau or as the top-L pairs with L the rounded mean simulated tie count.
 *
 * References:
 * - Wavefit METHODS.md section 6 (our own device; no published source claimed).
 */
import { createRng } from '../prng';
import type { TieFrequencies } from './tieFrequencies';

/**
 * A pair mask: mask[i*n+j] = 1 when the pair takes part (free and not missing). The diagonal never
 * takes part. Omitted means every off-diagonal pair.
 */
export type PairMask = ArrayLike<number>;

function checkMask(n: number, mask: PairMask | undefined): void {
  if (mask && mask.length !== n * n) throw new Error(`consensus: a pair mask for ${n} actors has ${n * n} entries, got ${mask.length}`);
}

/**
 * C_tau = 1[f_ij >= tau] over the pairs of the mask. Compared in integers (count >= tau * N, with a
 * 1e-9 allowance for tau given in decimals) so that, e.g., tau = 0.5 with N = 10 keeps pairs seen 5 times.
 * @throws Error("consensus: ...") for tau outside (0, 1] or no simulated networks
 */
export function consensusAtThreshold(freq: TieFrequencies, tau: number, mask?: PairMask): Uint8Array {
  if (!(tau > 0 && tau <= 1)) throw new Error(`consensus: the threshold must lie in (0, 1], got ${String(tau)}`);
  if (freq.networks === 0) throw new Error('consensus: no simulated networks were counted');
  const { n, counts, networks } = freq;
  checkMask(n, mask);
  const needed = tau * networks - 1e-9;
  const out = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const k = i * n + j;
      if (i === j || (mask && !mask[k])) continue;
      if (counts[k] >= needed) out[k] = 1;
    }
  }
  return out;
}

/**
 * Top-L consensus: the L pairs of the mask with the highest counts, ties among equal counts broken by
 * a seeded random order (so the same seed gives the same network). L defaults to the rounded mean
 * simulated tie count.
 */
export function consensusTopL(freq: TieFrequencies, seed: number, mask?: PairMask, L?: number): Uint8Array {
  if (freq.networks === 0) throw new Error('consensus: no simulated networks were counted');
  const { n, counts } = freq;
  checkMask(n, mask);
  const target = L ?? Math.round(freq.meanTies());
  if (!Number.isInteger(target) || target < 0) throw new Error(`consensus: L must be a non-negative integer, got ${String(target)}`);
  const rng = createRng(seed);
  const pairs: number[] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const k = i * n + j;
      if (i !== j && (!mask || mask[k])) pairs.push(k);
    }
  }
  // A random key per pair (drawn in pair order, so it depends only on the seed and the mask).
  const key = new Float64Array(n * n);
  for (const k of pairs) key[k] = rng.nextDouble();
  pairs.sort((a, b) => counts[b] - counts[a] || key[a] - key[b]);
  const out = new Uint8Array(n * n);
  for (let r = 0; r < Math.min(target, pairs.length); r++) out[pairs[r]] = 1;
  return out;
}
