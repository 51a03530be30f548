/**
 * Period simulator: runs the continuous-time actor-oriented model over one period (t from 0 to 1).
 *
 * Purpose: from a start network, draw waiting times, acting actors and their multinomial-logit choices
 * (ministeps) until the period ends; optionally accumulate the score-function pieces for derivatives.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics.
 *   Sociological Methodology 31, 361-395. (the model and the unconditional simulation of a period)
 * - Gillespie, D.T. (1977). Exact stochastic simulation of coupled chemical reactions.
 *   Journal of Physical Chemistry 81, 2340-2361. (event-driven simulation of a Markov jump process)
 * - McFadden, D. (1974). Conditional logit analysis of qualitative choice behavior. (the choice rule)
 * - Schweinberger, M. & Snijders, T.A.B. (2007). Markov models for digraph panel data: Monte Carlo-based
 *   derivative estimation. Computational Statistics & Data Analysis 51, 4465-4483. (score function)
 * - Wavefit METHODS.md sections 2, 3, 4.2.2 and 8.
 */
import { cachesFor, type Effect } from './effects';
import { compileUtilityKernel } from './kernel';
import type { Rng } from './prng';
import { NetworkState } from './state';

export interface SimulateOptions {
  /** The observed network at the start of the period; a NetworkState is copied, never changed. */
  start: NetworkState | Uint8Array;
  /** Rate lambda: each active actor gets opportunities from a Poisson process of this rate per period. */
  rate: number;
  effects: ReadonlyArray<Effect>;
  /** One parameter per effect, in the same order. */
  params: Float64Array | ReadonlyArray<number>;
  rng: Rng;
  /** Pair mask (n*n): 1 = free, 0 = fixed (never offered as a choice, keeps its value). */
  free?: Uint8Array;
  /** Actor mask (n): 0 = absent this period (no opportunities; its pairs are not free). */
  active?: Uint8Array;
  /** Accumulate the score function [J_rate, J_beta_1..K] (METHODS 4.2.2). */
  collectScores?: boolean;
  /** Return the number of ministeps of each actor. */
  countPerActor?: boolean;
  /**
   * Cap on the number of ministeps; reaching it throws. Default: the Poisson mean plus 10 standard
   * deviations plus 10 (METHODS 8.9).
   */
  maxMinisteps?: number;
  /**
   * Called after every ministep with its time, the acting actor, the chosen option (= actor for
   * "no change") and the sign of the change (+1 created, -1 dissolved, 0 no change). It sees the state
   * after the ministep and must not change it. It draws no random numbers, so a chain with an observer
   * is the same chain as without one.
   */
  observer?: MinistepObserver;
}

/** See SimulateOptions.observer. */
export type MinistepObserver = (t: number, actor: number, choice: number, sign: number, state: NetworkState) => void;

export interface SimulateResult {
  /** The network at t = 1 (a new state, with the caches the effects need). */
  end: NetworkState;
  /** Number of ministeps R, "no change" ones included. */
  ministeps: number;
  /** Number of ministeps that toggled a tie. */
  changes: number;
  /** [J_rate, J_beta_1..J_beta_K] when collectScores is set. */
  scores?: Float64Array;
  /** Ministeps per actor when countPerActor is set. */
  actorMinisteps?: Int32Array;
}

/** The start network as a state with exactly the caches `effects` need, sized and checked. */
function startState(start: NetworkState | Uint8Array, effects: ReadonlyArray<Effect>): NetworkState {
  const caches = cachesFor(effects);
  if (start instanceof NetworkState) return start.clone(caches);
  if (!(start instanceof Uint8Array)) throw new Error('simulate: start must be a NetworkState or a Uint8Array');
  const n = Math.round(Math.sqrt(start.length));
  if (n * n !== start.length) {
    throw new Error(`simulate: a start adjacency of length ${start.length} is not square`);
  }
  return NetworkState.fromAdjacency(n, start, caches);
}

/** The combined option mask (free pair and both actors active), or null when every pair is free. */
function optionMask(n: number, free?: Uint8Array, active?: Uint8Array): Uint8Array | null {
  if (free === undefined && active === undefined) return null;
  if (free !== undefined && free.length !== n * n) {
    throw new Error(`simulate: the pair mask has ${free.length} entries for ${n} actors (expected ${n * n})`);
  }
  if (active !== undefined && active.length !== n) {
    throw new Error(`simulate: the actor mask has ${active.length} entries for ${n} actors`);
  }
  return freePairMask(n, free, active);
}

/** Free ordered pairs (i != j, pair free, both actors active) as a 0/1 n*n mask; every pair when no masks are given. */
export function freePairMask(n: number, free?: ArrayLike<number>, active?: ArrayLike<number>): Uint8Array {
  const mask = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i === j) continue;
      let ok = free === undefined || free[i * n + j] !== 0;
      if (ok && active !== undefined) ok = active[i] !== 0 && active[j] !== 0;
      mask[i * n + j] = ok ? 1 : 0;
    }
  }
  return mask;
}

/** The largest of u[0..n-1] and 0 (option "no change" always has utility 0). */
function maxOf(u: Float64Array, n: number): number {
  let max = 0;
  for (let j = 0; j < n; j++) if (u[j] > max) max = u[j];
  return max;
}

/**
 * Simulate one period. Uses exactly three uniforms per ministep (waiting time, actor, choice) plus one
 * for the waiting time that ends the period. Does not change `start`.
 *
 * @throws Error("simulate: ...") on inconsistent input or when the ministep cap is reached
 */
export function simulatePeriod(options: SimulateOptions): SimulateResult {
  const { effects, rng } = options;
  const rate = options.rate;
  if (typeof rate !== 'number' || !Number.isFinite(rate) || rate < 0) {
    throw new Error(`simulate: the rate must be a finite number >= 0, got ${String(rate)}`);
  }
  const K = effects.length;
  const params = Float64Array.from(options.params);
  if (params.length !== K) {
    throw new Error(`simulate: ${K} effects but ${params.length} parameters`);
  }
  for (let k = 0; k < K; k++) {
    if (!Number.isFinite(params[k])) {
      throw new Error(`simulate: the parameter of ${effects[k].key} is not a finite number (${params[k]})`);
    }
  }
  const state = startState(options.start, effects);
  const n = state.n;
  for (const e of effects) {
    if (e.actorCount !== undefined && e.actorCount !== n) {
      throw new Error(`simulate: ${e.key} describes ${e.actorCount} actors but the network has ${n}`);
    }
  }
  const mask = optionMask(n, options.free, options.active);

  // Acting actors.
  const actors = new Int32Array(n);
  let nActive = 0;
  for (let i = 0; i < n; i++) if (options.active === undefined || options.active[i]) actors[nActive++] = i;
  const totalRate = nActive * rate;
  const mean = totalRate;
  const cap = options.maxMinisteps ?? Math.ceil(mean + 10 * Math.sqrt(mean) + 10);
  if (!(cap >= 0)) throw new Error(`simulate: maxMinisteps must be >= 0, got ${String(options.maxMinisteps)}`);

  // Effects with a kernel term go into one generated loop (kernel.ts); the others, and zero
  // parameters, are handled apart (the others accumulated row by row after the kernel).
  const fusedIdx: number[] = [];
  const generalIdx: number[] = [];
  for (let k = 0; k < K; k++) {
    if (params[k] === 0) continue;
    if (effects[k].kernel !== undefined) fusedIdx.push(k);
    else generalIdx.push(k);
  }
  const nGeneral = generalIdx.length;
  const kernel = compileUtilityKernel(effects, params, fusedIdx);

  // Buffers, allocated once per period (none in the ministep loop).
  const u = new Float64Array(n);
  const cum = new Float64Array(n);
  const collect = options.collectScores === true;
  const rows = collect ? new Float64Array(K * n) : null;
  const scoreBeta = collect ? new Float64Array(K) : null;
  const weights = collect ? new Float64Array(n) : null;
  const rowViews: Float64Array[] = [];
  if (rows !== null) for (let k = 0; k < K; k++) rowViews.push(rows.subarray(k * n, (k + 1) * n));
  const perActor = options.countPerActor ? new Int32Array(n) : null;
  const observer = options.observer ?? null;

  let t = 0;
  let R = 0;
  let changes = 0;
  for (;;) {
    const u1 = rng.nextDouble();
    t -= Math.log(1 - u1) / totalRate;
    if (!(t < 1)) break;
    if (R >= cap) {
      throw new Error(
        `simulate: reached the cap of ${cap} ministeps (expected about ${mean.toFixed(1)} at rate ${rate} for ${nActive} actors); ` +
          'the rate is probably running away',
      );
    }
    const u2 = rng.nextDouble();
    const u3 = rng.nextDouble();
    let pick = Math.floor(u2 * nActive);
    if (pick >= nActive) pick = nActive - 1;
    const i = actors[pick];
    const row = i * n;

    // Utilities u_j = sum_k beta_k delta_ijk; option i (no change) has utility 0.
    let max: number;
    if (rows === null) {
      max = kernel(state, i, u);
      if (nGeneral > 0) {
        for (let t = 0; t < nGeneral; t++) {
          const k = generalIdx[t];
          effects[k].accumulate(state, i, params[k], u);
        }
        u[i] = 0;
        max = maxOf(u, n);
      }
    } else {
      rows.fill(0);
      u.fill(0);
      for (let k = 0; k < K; k++) {
        const rk = rowViews[k];
        effects[k].accumulate(state, i, 1, rk);
        rk[i] = 0;
        const b = params[k];
        if (b !== 0) for (let j = 0; j < n; j++) u[j] += b * rk[j];
      }
      u[i] = 0;
      max = maxOf(u, n);
    }
    if (mask !== null) {
      for (let j = 0; j < n; j++) if (j !== i && mask[row + j] === 0) u[j] = -Infinity;
      max = maxOf(u, n);
    }
    let sum = 0;
    for (let j = 0; j < n; j++) {
      sum += Math.exp(u[j] - max);
      cum[j] = sum;
    }
    if (weights !== null) for (let j = 0; j < n; j++) weights[j] = Math.exp(u[j] - max);
    if (!Number.isFinite(sum)) throw new Error(`simulate: the choice probabilities of actor ${i} are not finite`);
    // Inverse CDF: the first option whose cumulative weight exceeds u3 * sum, found by bisection (the
    // cumulative weights are non-decreasing). When rounding puts the target at or above the total, the
    // search ends on the last option; step back to the last one that added weight (never a masked one).
    const target = u3 * sum;
    let lo = 0;
    let hi = n - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (target < cum[mid]) hi = mid;
      else lo = mid + 1;
    }
    if (!(target < cum[lo])) while (lo > 0 && cum[lo] === cum[lo - 1]) lo--;
    const choice = lo;

    if (rows !== null && scoreBeta !== null && weights !== null) {
      // J_beta_k += delta_{i,choice,k} - sum_h p_h delta_{ihk}
      const inv = 1 / sum;
      for (let k = 0; k < K; k++) {
        const off = k * n;
        let expected = 0;
        for (let h = 0; h < n; h++) {
          const w = weights[h];
          if (w > 0) expected += w * rows[off + h];
        }
        scoreBeta[k] += rows[off + choice] - expected * inv;
      }
    }

    R++;
    if (perActor !== null) perActor[i]++;
    let sign = 0;
    if (choice !== i) {
      sign = state.toggle(i, choice);
      changes++;
    }
    if (observer !== null) observer(t, i, choice, sign, state);
  }

  const result: SimulateResult = { end: state, ministeps: R, changes };
  if (collect && scoreBeta !== null) {
    const scores = new Float64Array(K + 1);
    scores[0] = rate > 0 ? R / rate - nActive : -nActive;
    scores.set(scoreBeta, 1);
    result.scores = scores;
  }
  if (perActor !== null) result.actorMinisteps = perActor;
  return result;
}

/** The target statistics sum_i s_ik(x) of the effects, in order (METHODS 2.1, second table). */
export function targetStatistics(state: NetworkState, effects: ReadonlyArray<Effect>): Float64Array {
  const out = new Float64Array(effects.length);
  for (let k = 0; k < effects.length; k++) out[k] = effects[k].statistic(state);
  return out;
}

/**
 * Hamming distance between two networks on the same actors: the number of ordered pairs (i != j) whose
 * tie differs, counting only free pairs when a pair mask (1 = free) is given.
 */
export function hamming(a: NetworkState | Uint8Array, b: NetworkState | Uint8Array, free?: Uint8Array): number {
  const x = a instanceof NetworkState ? a.adj : a;
  const y = b instanceof NetworkState ? b.adj : b;
  if (x.length !== y.length) throw new Error(`simulate: hamming of networks of different sizes (${x.length} vs ${y.length} entries)`);
  if (free !== undefined && free.length !== x.length) {
    throw new Error(`simulate: the pair mask has ${free.length} entries, the networks ${x.length}`);
  }
  let d = 0;
  if (free === undefined) {
    for (let k = 0; k < x.length; k++) d += x[k] ^ y[k];
  } else {
    for (let k = 0; k < x.length; k++) if (free[k]) d += x[k] ^ y[k];
  }
  return d;
}
