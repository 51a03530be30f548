/**
 * Effect interface: what the simulator and the estimator see of one term of the objective function.
 *
 * Purpose: one shape for every effect, so the simulator only walks a list.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics.
 *   Sociological Methodology 31, 361-395.
 * - Snijders, T.A.B., van de Bunt, G.G. & Steglich, C.E.G. (2010). Introduction to stochastic
 *   actor-based models for network dynamics. Social Networks 32, 44-60.
 * - Wavefit METHODS.md section 2.1 (change statistics and network totals).
 */
import type { EffectId } from '../../../shared/effects';
import type { NetworkState, StateCaches } from '../state';

export interface Effect {
  readonly id: EffectId;
  /** Unique key within a model: the id, or `id:covariate` for covariate effects. */
  readonly key: string;
  /** Display label, e.g. "Covariate alter (age)". */
  readonly label: string;
  readonly kind: 'structural' | 'covariate';
  /** The covariate name for covariate effects. */
  readonly covariate?: string;
  /** The number of actors the covariate vector describes (covariate effects only). */
  readonly actorCount?: number;
  /** The state caches `change` and `accumulate` read. `statistic` works without them. */
  readonly needs: Readonly<StateCaches>;
  /** delta_ij: the change in ego i's statistic s_i when the tie i->j is toggled (i != j). */
  change(state: NetworkState, i: number, j: number): number;
  /**
   * Row form for the simulator's hot loop: out[j] += weight * delta_ij for every j != i.
   * out[i] is left unspecified; the caller sets it (option i means "no change").
   */
  accumulate(state: NetworkState, i: number, weight: number, out: Float64Array): void;
  /** The network total sum_i s_i(x), the target statistic of the method of moments. */
  statistic(state: NetworkState): number;
  /**
   * Optional source snippets of delta_ij for the simulator's generated utility loop (server/engine/kernel.ts).
   * Effects without one are accumulated row by row after the kernel.
   */
  readonly kernel?: KernelTerm;
}

/**
 * An effect's change statistic as snippets of JavaScript source, pasted into one generated loop:
 *
 *   delta_ij = (x_ij = 0 ? create : remove) + (1 - 2 x_ij) * pair
 *
 * `create` and `remove` may read ego i only; `pair` is evaluated for each alter j with k = i*n + j.
 * Available names: n, i, row (= i*n), j, k, adj, adjT, p2, so, indeg, outdeg (the NetworkState arrays).
 * `$name` is private to the term: a field of `data` or a constant declared in `pre`. Omitted parts are 0.
 * Snippets are expressions (and `const` declarations in `pre`), with no braces.
 */
export interface KernelTerm {
  /** `const` declarations run once per ministep, before the loop over alters. */
  readonly pre?: string;
  readonly create?: string;
  readonly remove?: string;
  readonly pair?: string;
  /** Arrays and numbers the snippets read as `$name`. */
  readonly data?: Readonly<Record<string, unknown>>;
}

/** A numeric covariate (NaN = missing) or a categorical one (integer codes >= 0, -1 = missing). */
export type CovariateValues = Float64Array | Int32Array;

/** An effect in a model specification. */
export interface EffectSpec {
  id: EffectId;
  /** The covariate's name, for covariate effects. */
  covariate?: string;
}

/**
 * Optional fixed summaries of a numeric covariate, for covariates that change between waves: pass the
 * mean, range and mean similarity computed over all the waves used (METHODS.md 1.5-1.6) so every period
 * is centred alike. Each defaults to the value computed from the vector itself.
 */
export interface CovariateCentring {
  mean?: number;
  range?: number;
  similarityMean?: number;
}
