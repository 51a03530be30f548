/**
 * The moment problem of a stochastic actor-oriented model over several periods.
 *
 * Purpose: turn periods (observed start and end networks, masks, effects built with that period's
 * covariates) and a parameter plan (which rates and effect parameters are estimated, which are fixed)
 * into the statistics and the seeded simulator the Robbins-Monro estimator needs, with the starting
 * values of METHODS 4.1.
 *
 * References:
 * - Snijders, T.A.B. (2001). The statistical evaluation of social network dynamics. Sociological
 *   Methodology 31, 361-395. (moment statistics: Hamming distance per period for each rate, network
 *   totals summed over periods for each effect; each period starts from the observed wave)
 * - Huisman, M. & Steglich, C. (2008). Treatment of non-response in longitudinal network studies.
 *   Social Networks 30, 297-308. (pairs missing at the end wave are overwritten in simulated networks)
 * - Wavefit METHODS.md sections 1.4, 3, 4.1 and 7c (the closed-form rate used as starting value).
 */
import type { Effect } from '../effects';
import { deriveSeed, createRng } from '../prng';
import { simulatePeriod, targetStatistics, hamming, freePairMask } from '../simulate';
import { NetworkState } from '../state';
import { EstimationFailed, type MomentProblem, type ParameterKind } from './moments';

/**
 * A rate above this many opportunities per actor and possible partner (lambda > 100 n) means every tie
 * is revisited many times within the period: the chain is at its stationary state and the observed
 * change no longer informs the rate. The estimator treats it as a runaway (our choice, METHODS 8.9).
 */
export const RATE_LIMIT_PER_ACTOR = 100;

export interface PeriodInput {
  /** Observed network at the start of the period (missing ties already imputed, METHODS 1.4), n*n. */
  start: Uint8Array;
  /** Observed network at the end of the period (missing ties imputed), n*n. */
  end: Uint8Array;
  /** 1 where the end tie is missing: the imputed value of `end` is written into every simulated end. */
  endMissing?: Uint8Array;
  /** Pair mask, 1 = free (default: every pair free). */
  free?: Uint8Array;
  /** Actor mask, 1 = active in this period (default: every actor). */
  active?: Uint8Array;
  /** The model's effects built with this period's covariates; the same keys, in the same order, in every period. */
  effects: Effect[];
  /** Label for messages, e.g. "wave 1 to wave 2". */
  label?: string;
}

/** A parameter that is estimated (with an optional starting value) or fixed at a value. */
export interface ParameterPlan {
  estimate: boolean;
  /** Starting value when estimated (default from METHODS 4.1), the value when fixed. */
  value?: number;
}

export interface SaomProblemInput {
  /** Number of actors (all periods share the actor set; absent actors are masked). */
  n: number;
  periods: PeriodInput[];
  /** One plan per period. */
  rates: ParameterPlan[];
  /** One plan per effect (same order as the periods' effects). */
  params: ParameterPlan[];
  /** Master seed; streams are deriveSeed(seed, phase, iteration, period). */
  seed: number;
  /**
   * Largest expected number of ministeps per period (n_m * lambda_m) accepted before a run is called a
   * runaway (default 2,000,000); rates are also limited to RATE_LIMIT_PER_ACTOR * n_m.
   */
  maxExpectedMinisteps?: number;
}

export interface ParameterInfo {
  kind: ParameterKind;
  /** "rate:<period>" or the effect key. */
  key: string;
  label: string;
  /** Index of the period (rates) or effect (objective parameters). */
  index: number;
  estimated: boolean;
}

export interface SaomProblem {
  problem: MomentProblem;
  /** Every parameter, rates first, then effects; `estimated` marks the ones in theta. */
  parameters: ParameterInfo[];
  /** Starting values of the estimated parameters. */
  start: number[];
  /** The observed statistic of each estimated parameter, as plain numbers (same as problem.target). */
  target: number[];
  /** Full rate and objective vectors from estimated values theta. */
  expand(theta: ReadonlyArray<number>): { rates: number[]; params: number[] };
  /** Notes on the starting values (e.g. a clamped rate). */
  notes: string[];
  /** Per period: observed Hamming distance over free pairs and the number of free pairs. */
  observedChange: Array<{ distance: number; freePairs: number; activeActors: number }>;
}

/**
 * The closed-form rate for all objective parameters 0 (METHODS 7c; exact then, our starting value
 * otherwise): lambda = -(n/2) ln(1 - 2c/F), with F the number of free ordered pairs (n(n-1) when all
 * are free). Ratios 2c/F at or above 0.95 are clamped to 0.95 (the formula has no solution at 1).
 */
export function closedFormRate(change: number, activeActors: number, freePairs: number): { rate: number; clamped: boolean } {
  if (freePairs <= 0 || activeActors < 2) return { rate: 0, clamped: false };
  let ratio = (2 * change) / freePairs;
  let clamped = false;
  if (ratio >= 0.95) {
    ratio = 0.95;
    clamped = true;
  }
  return { rate: -(activeActors / 2) * Math.log(1 - ratio), clamped };
}

function logit(p: number): number {
  return Math.log(p / (1 - p));
}

/** Applies the end-wave overwrite of METHODS 1.4 to a simulated end state. */
function overwriteMissing(state: NetworkState, end: Uint8Array, missing: Uint8Array): void {
  const n = state.n;
  for (let k = 0; k < missing.length; k++) {
    if (!missing[k]) continue;
    if (state.adj[k] !== end[k]) {
      const i = Math.floor(k / n);
      state.toggle(i, k - i * n);
    }
  }
}

export function buildSaomProblem(input: SaomProblemInput): SaomProblem {
  const { n, periods, rates, params, seed } = input;
  const M = periods.length;
  if (M === 0) throw new Error('estimate: a model needs at least one period');
  if (rates.length !== M) throw new Error(`estimate: ${M} periods but ${rates.length} rate plans`);
  const K = periods[0].effects.length;
  if (params.length !== K) throw new Error(`estimate: ${K} effects but ${params.length} parameter plans`);
  const keys = periods[0].effects.map((e) => e.key);
  periods.forEach((per, m) => {
    if (per.start.length !== n * n || per.end.length !== n * n) {
      throw new Error(`estimate: period ${m + 1} networks must have ${n * n} entries`);
    }
    if (per.effects.length !== K || per.effects.some((e, k) => e.key !== keys[k])) {
      throw new Error(`estimate: period ${m + 1} has a different list of effects`);
    }
  });
  const maxExpected = input.maxExpectedMinisteps ?? 2_000_000;

  // Observed quantities per period.
  const masks = periods.map((per) => freePairMask(n, per.free, per.active));
  const endStates = periods.map((per) => NetworkState.fromAdjacency(n, per.end));
  const observedChange = periods.map((per, m) => {
    const freePairs = masks[m].reduce((s, v) => s + v, 0);
    const activeActors = per.active ? per.active.reduce((s, v) => s + (v ? 1 : 0), 0) : n;
    return { distance: hamming(per.start, per.end, masks[m]), freePairs, activeActors };
  });
  const observedStats = new Float64Array(K);
  periods.forEach((per, m) => {
    const s = targetStatistics(endStates[m], per.effects);
    for (let k = 0; k < K; k++) observedStats[k] += s[k];
  });

  // Parameter list, rates first.
  const parameters: ParameterInfo[] = [];
  periods.forEach((per, m) =>
    parameters.push({
      kind: 'rate',
      key: `rate:${m + 1}`,
      label: `Rate, ${per.label ?? `period ${m + 1}`}`,
      index: m,
      estimated: rates[m].estimate,
    }),
  );
  periods[0].effects.forEach((e, k) =>
    parameters.push({ kind: 'objective', key: e.key, label: e.label, index: k, estimated: params[k].estimate }),
  );
  const estimated = parameters.filter((q) => q.estimated);

  // Starting values (METHODS 4.1).
  const notes: string[] = [];
  const fullRates = rates.map((plan, m) => {
    if (plan.value !== undefined) return plan.value;
    const oc = observedChange[m];
    const { rate, clamped } = closedFormRate(oc.distance, oc.activeActors, oc.freePairs);
    if (clamped) {
      notes.push(
        `Period ${m + 1} changes more than the gradual-change model expects (${oc.distance} of ${oc.freePairs} pairs); its starting rate was capped.`,
      );
    }
    return rate;
  });
  let densitySum = 0;
  let densityCount = 0;
  periods.forEach((per, m) => {
    const F = observedChange[m].freePairs;
    if (F === 0) return;
    for (const net of [per.start, per.end]) {
      let ties = 0;
      for (let k = 0; k < net.length; k++) if (masks[m][k]) ties += net[k];
      densitySum += ties / F;
      densityCount++;
    }
  });
  const meanDensity = densityCount ? densitySum / densityCount : 0.5;
  const clampedDensity = Math.min(Math.max(meanDensity, 0.01), 0.99);
  const fullParams = params.map((plan, k) => {
    if (plan.value !== undefined) return plan.value;
    if (keys[k] === 'density') return logit(clampedDensity);
    return 0;
  });
  const start = estimated.map((q) => (q.kind === 'rate' ? fullRates[q.index] : fullParams[q.index]));
  const target = estimated.map((q) => (q.kind === 'rate' ? observedChange[q.index].distance : observedStats[q.index]));

  const expand = (theta: ReadonlyArray<number>) => {
    const r = fullRates.slice();
    const b = fullParams.slice();
    estimated.forEach((q, e) => {
      if (q.kind === 'rate') r[q.index] = theta[e];
      else b[q.index] = theta[e];
    });
    return { rates: r, params: b };
  };

  // Runaway guard (METHODS 8.9): rates above these limits stop the run with a reason.
  const rateLimits = observedChange.map((oc) =>
    oc.activeActors > 0 ? Math.min(maxExpected / oc.activeActors, RATE_LIMIT_PER_ACTOR * oc.activeActors) : Infinity,
  );
  const rateSlot = new Int32Array(M).fill(-1);
  const paramSlot = new Int32Array(K).fill(-1);
  estimated.forEach((q, e) => {
    if (q.kind === 'rate') rateSlot[q.index] = e;
    else paramSlot[q.index] = e;
  });
  const startStates = periods.map((per) => NetworkState.fromAdjacency(n, per.start));

  const problem: MomentProblem = {
    names: estimated.map((q) => q.label),
    kinds: estimated.map((q) => q.kind),
    target,
    periodsPerRun: M,
    simulate(theta, phase, iteration) {
      const { rates: r, params: b } = expand(theta);
      const z = new Array<number>(estimated.length).fill(0);
      for (let m = 0; m < M; m++) {
        const per = periods[m];
        if (!(r[m] <= rateLimits[m])) {
          throw new EstimationFailed(
            `the rate of period ${m + 1} reached ${r[m].toPrecision(4)} (limit ${rateLimits[m].toPrecision(4)}: ` +
              `${RATE_LIMIT_PER_ACTOR} opportunities per actor and possible partner, at most ${maxExpected} ministeps per period); ` +
              'it is running away, so the observed change is probably more than the model can produce. Fix this rate, or add effects that explain the change.',
            phase,
          );
        }
        const rng = createRng(deriveSeed(seed, phase, iteration, m));
        const result = simulatePeriod({
          start: startStates[m],
          rate: r[m],
          effects: per.effects,
          params: b,
          rng,
          free: per.free,
          active: per.active,
        });
        const end = result.end;
        if (per.endMissing) overwriteMissing(end, per.end, per.endMissing);
        if (rateSlot[m] >= 0) z[rateSlot[m]] = hamming(startStates[m], end, masks[m]);
        let needStats = false;
        for (let k = 0; k < K; k++) if (paramSlot[k] >= 0) needStats = true;
        if (needStats) {
          for (let k = 0; k < K; k++) {
            const slot = paramSlot[k];
            if (slot >= 0) z[slot] += per.effects[k].statistic(end);
          }
        }
      }
      return z;
    },
  };
  return { problem, parameters, start, target, expand, notes, observedChange };
}
