/**
 * Covariate effects: covariate ego, covariate alter, covariate similarity and same category.
 *
 * Purpose: change statistics and network totals for effects of an actor attribute, with the centring and
 * similarity scaling of METHODS.md 1.5-1.7.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics.
 *   Sociological Methodology 31, 361-395. (centring of covariates)
 * - Steglich, C., Snijders, T.A.B. & Pearson, M. (2010). Dynamic networks and behavior: separating
 *   selection from influence. Sociological Methodology 40, 329-393. (similarity 1 - |v_i - v_j| / range,
 *   centred by its mean over ordered pairs)
 * - Wavefit METHODS.md sections 1.5-1.7 and 2.1. Missing numeric values become 0 after centring (so the
 *   similarity of an actor with a missing value is computed at the mean); a missing category matches
 *   nothing [our choice, METHODS 1.7].
 */
import type { NetworkState } from '../state';
import type { CovariateCentring, Effect } from './types';

/** Centred copy of a numeric covariate: v - mean over non-missing values; missing (NaN) becomes 0. */
export function centreCovariate(values: Float64Array, name: string, mean?: number): { centred: Float64Array; mean: number } {
  let sum = 0;
  let count = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (Number.isNaN(v)) continue;
    if (!Number.isFinite(v)) throw new Error(`effects: covariate "${name}" has an infinite value at actor ${i}`);
    sum += v;
    count++;
  }
  if (mean === undefined) {
    if (count === 0) throw new Error(`effects: covariate "${name}" has no observed values`);
    mean = sum / count;
  }
  if (!Number.isFinite(mean)) throw new Error(`effects: the mean given for covariate "${name}" is not a finite number`);
  const centred = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) centred[i] = Number.isNaN(values[i]) ? 0 : values[i] - mean;
  return { centred, mean };
}

/** Range (max - min) of the observed values. */
export function covariateRange(values: Float64Array): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (Number.isNaN(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return hi >= lo ? hi - lo : 0;
}

/**
 * Mean of sim_ij = 1 - |c_i - c_j| / range over ordered pairs i != j, for the centred values c (missing
 * already at 0). O(n log n): after sorting, sum_{a<b} |c_(b) - c_(a)| = sum_b c_(b) (2b - n + 1).
 */
export function similarityMean(centred: Float64Array, range: number): number {
  const n = centred.length;
  if (n < 2) return 0;
  const sorted = Float64Array.from(centred).sort();
  let absSum = 0;
  for (let b = 0; b < n; b++) absSum += sorted[b] * (2 * b - n + 1);
  return 1 - (2 * absSum) / range / (n * (n - 1));
}

export function covariateEgoEffect(name: string, values: Float64Array, centring: CovariateCentring = {}): Effect {
  const { centred: c } = centreCovariate(values, name, centring.mean);
  return {
    id: 'covariate_ego',
    key: `covariate_ego:${name}`,
    label: `Covariate ego (${name})`,
    kind: 'covariate',
    covariate: name,
    actorCount: c.length,
    needs: {},
    change(state: NetworkState, i: number, j: number): number {
      return (1 - 2 * state.adj[i * state.n + j]) * c[i];
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const n = state.n;
      const adj = state.adj;
      const row = i * n;
      const w = weight * c[i];
      const w2 = 2 * w;
      for (let j = 0; j < n; j++) out[j] += w - w2 * adj[row + j];
    },
    statistic(state: NetworkState): number {
      let s = 0;
      for (let i = 0; i < state.n; i++) s += c[i] * state.outdeg[i];
      return s;
    },
    kernel: { data: { c }, create: '$c[i]', remove: '-$c[i]' },
  };
}

export function covariateAlterEffect(name: string, values: Float64Array, centring: CovariateCentring = {}): Effect {
  const { centred: c } = centreCovariate(values, name, centring.mean);
  return {
    id: 'covariate_alter',
    key: `covariate_alter:${name}`,
    label: `Covariate alter (${name})`,
    kind: 'covariate',
    covariate: name,
    actorCount: c.length,
    needs: {},
    change(state: NetworkState, i: number, j: number): number {
      return (1 - 2 * state.adj[i * state.n + j]) * c[j];
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const n = state.n;
      const adj = state.adj;
      const row = i * n;
      for (let j = 0; j < n; j++) out[j] += weight * (1 - 2 * adj[row + j]) * c[j];
    },
    statistic(state: NetworkState): number {
      let s = 0;
      for (let j = 0; j < state.n; j++) s += c[j] * state.indeg[j];
      return s;
    },
    kernel: { data: { c }, pair: '$c[j]' },
  };
}

export function covariateSimilarityEffect(name: string, values: Float64Array, centring: CovariateCentring = {}): Effect {
  const { centred: c } = centreCovariate(values, name, centring.mean);
  const range = centring.range ?? covariateRange(values);
  if (!Number.isFinite(range) || range <= 0) {
    throw new Error(`effects: covariate_similarity needs covariate "${name}" to take at least two different values (its range is 0)`);
  }
  const simMean = centring.similarityMean ?? similarityMean(c, range);
  const inv = 1 / range;
  const base = 1 - simMean; // sim_ij - simMean = base - |c_i - c_j| / range
  return {
    id: 'covariate_similarity',
    key: `covariate_similarity:${name}`,
    label: `Covariate similarity (${name})`,
    kind: 'covariate',
    covariate: name,
    actorCount: c.length,
    needs: {},
    change(state: NetworkState, i: number, j: number): number {
      return (1 - 2 * state.adj[i * state.n + j]) * (base - Math.abs(c[i] - c[j]) * inv);
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const n = state.n;
      const adj = state.adj;
      const row = i * n;
      const ci = c[i];
      for (let j = 0; j < n; j++) out[j] += weight * (1 - 2 * adj[row + j]) * (base - Math.abs(ci - c[j]) * inv);
    },
    statistic(state: NetworkState): number {
      const { n, adj } = state;
      let s = 0;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) if (adj[i * n + j]) s += base - Math.abs(c[i] - c[j]) * inv;
      }
      return s;
    },
    kernel: { data: { c, base, inv }, pre: 'const $ci = $c[i];', pair: '$base - Math.abs($ci - $c[j]) * $inv' },
  };
}

export function sameCovariateEffect(name: string, codes: Int32Array): Effect {
  for (let i = 0; i < codes.length; i++) {
    if (codes[i] < -1) {
      throw new Error(`effects: categorical covariate "${name}" has code ${codes[i]} at actor ${i} (codes are >= 0, -1 for missing)`);
    }
  }
  const v = Int32Array.from(codes);
  return {
    id: 'same_covariate',
    key: `same_covariate:${name}`,
    label: `Same category (${name})`,
    kind: 'covariate',
    covariate: name,
    actorCount: v.length,
    needs: {},
    change(state: NetworkState, i: number, j: number): number {
      const vi = v[i];
      return vi >= 0 && vi === v[j] ? 1 - 2 * state.adj[i * state.n + j] : 0;
    },
    accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void {
      const vi = v[i];
      if (vi < 0) return;
      const n = state.n;
      const adj = state.adj;
      const row = i * n;
      for (let j = 0; j < n; j++) if (v[j] === vi) out[j] += weight * (1 - 2 * adj[row + j]);
    },
    statistic(state: NetworkState): number {
      const { n, adj } = state;
      let s = 0;
      for (let i = 0; i < n; i++) {
        const vi = v[i];
        if (vi < 0) continue;
        for (let j = 0; j < n; j++) if (adj[i * n + j] && v[j] === vi) s++;
      }
      return s;
    },
    // A missing category (-1) matches nothing, so ego's term is switched off.
    kernel: { data: { v }, pre: 'const $vi = $v[i]; const $on = $vi >= 0 ? 1 : 0;', pair: '$v[j] === $vi ? $on : 0' },
  };
}
