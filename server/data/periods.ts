/**
 * From a study's stored waves and covariates to what a batch simulates per period: the start network
 * (missing ties imputed), the observed end network (missing ties imputed), which end pairs were missing,
 * the pair mask for comparisons, and each period's covariates with the common centring.
 *
 * Conventions (METHODS.md 1.4-1.6, after Huisman & Steglich 2008, Social Networks 30:297-308):
 * - a missing tie at the start of period m takes the pair's last observed value up to wave m, else 0;
 * - a missing tie at the end of period m takes the same rule up to wave m + 1 (which, being missing at
 *   m + 1, is the start's imputed value), and that value is written into every simulated end network
 *   before statistics are computed, so those pairs neither help nor hurt the fit;
 * - comparisons of tie sets (consensus networks) use only pairs observed at the end wave;
 * - fixed pairs (structural zeros and ones) and composition (the upload's fixed-pairs file and
 *   present@ columns, shared/data.ts): a pair fixed at both waves of a period with the same value is
 *   not free in that period (the simulator never offers it); an actor present at both waves is active,
 *   any other is not (no opportunities, its pairs not free); the end value of an inactive actor's
 *   pair is treated like a missing end tie (the start value is written into every simulated end, and
 *   the pair takes no part in comparisons), so a joiner's first ties neither help nor hurt the fit;
 * - a covariate that changes between waves uses its column for wave m in period m; its mean, range and
 *   mean similarity are taken over the columns of waves 1 .. M-1, so every period is centred alike.
 */
import { centreCovariate, covariateRange, similarityMean, type CovariateCentring, type CovariateValues } from '../engine/effects';
import type { LoadedStudyData } from './store';

/** Codes of LoadedStudyData.waves. */
const TIE = 1;
const MISSING = 2;

export interface PeriodNetworks {
  /** Period number, from 1 (wave `period` to wave `period + 1`). */
  period: number;
  start: Uint8Array;
  /** Observed end network, missing pairs imputed. */
  end: Uint8Array;
  /** 1 where the end tie was not observed (null when none was missing). */
  endMissing: Uint8Array | null;
  /** 1 for pairs that take part in comparisons: off-diagonal and observed at the end wave. */
  compareMask: Uint8Array;
  /** Pair mask for the simulator (1 free, 0 fixed in this period), or null when every pair is free. */
  free: Uint8Array | null;
  /** Actor mask for the simulator (1 active), or null when every actor is active. */
  active: Uint8Array | null;
}

/** Start and end networks of every period (M - 1 of them). */
export function periodNetworks(data: LoadedStudyData): PeriodNetworks[] {
  const n = data.actors.length;
  const M = data.waves.length;
  if (M < 2) throw new Error('batch-periods: a study needs at least two waves');
  // imputed[w]: wave w with every missing pair replaced by its last observed value up to w, else 0.
  const imputed: Uint8Array[] = [];
  for (let w = 0; w < M; w++) {
    const wave = data.waves[w];
    if (wave.length !== n * n) throw new Error(`batch-periods: wave ${w + 1} does not match the ${n} actors`);
    const out = new Uint8Array(n * n);
    for (let k = 0; k < n * n; k++) {
      const v = wave[k];
      out[k] = v === MISSING ? (w > 0 ? imputed[w - 1][k] : 0) : v === TIE ? 1 : 0;
    }
    for (let i = 0; i < n; i++) out[i * n + i] = 0;
    imputed.push(out);
  }
  const periods: PeriodNetworks[] = [];
  for (let m = 1; m < M; m++) {
    const endWave = data.waves[m];
    const [fixedA, fixedB] = [data.fixed?.[m - 1] ?? null, data.fixed?.[m] ?? null];
    const [presentA, presentB] = [data.present?.[m - 1] ?? null, data.present?.[m] ?? null];
    let active: Uint8Array | null = null;
    if (presentA || presentB) {
      active = new Uint8Array(n);
      for (let i = 0; i < n; i++) active[i] = (presentA ? presentA[i] : 1) && (presentB ? presentB[i] : 1) ? 1 : 0;
    }
    const start = imputed[m - 1];
    let end = imputed[m];
    let free: Uint8Array | null = null;
    let anyMissing = false;
    const endMissing = new Uint8Array(n * n);
    const compareMask = new Uint8Array(n * n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        if (i === j) continue;
        const k = i * n + j;
        if (fixedA && fixedB && fixedA[k] && fixedB[k] && start[k] === end[k]) {
          free ??= new Uint8Array(n * n).fill(1);
          free[k] = 0;
        }
        if (active && (!active[i] || !active[j])) {
          // not simulated in this period: like a missing end tie, the start value stands in for it
          if (end[k] !== start[k]) {
            if (end === imputed[m]) end = end.slice();
            end[k] = start[k];
          }
          endMissing[k] = 1;
          anyMissing = true;
        } else if (endWave[k] === MISSING) {
          endMissing[k] = 1;
          anyMissing = true;
        } else {
          compareMask[k] = 1;
        }
      }
    }
    periods.push({ period: m, start, end, endMissing: anyMissing ? endMissing : null, compareMask, free, active });
  }
  return periods;
}

export interface PeriodCovariates {
  values: Record<string, CovariateValues>;
  centring: Record<string, CovariateCentring>;
}

/** Each period's covariate vectors and the centring shared by all periods. */
export function periodCovariates(data: LoadedStudyData): PeriodCovariates[] {
  const M = data.waves.length;
  const periods: PeriodCovariates[] = Array.from({ length: M - 1 }, () => ({ values: {}, centring: {} }));
  for (const [name, cov] of Object.entries(data.covariates)) {
    const columns = cov.values as CovariateValues[];
    if (columns.length === 0) continue;
    const columnFor = (m: number) => (cov.changing ? columns[Math.min(m, columns.length - 1)] : columns[0]);
    if (cov.kind === 'categorical') {
      for (let m = 0; m < M - 1; m++) periods[m].values[name] = columnFor(m) as Int32Array;
      continue;
    }
    const used = cov.changing ? columns.slice(0, M - 1) : [columns[0]];
    // One long vector of every value used, for the common mean and range.
    const all = new Float64Array(used.reduce((s, c) => s + c.length, 0));
    let offset = 0;
    for (const c of used) {
      all.set(c as Float64Array, offset);
      offset += c.length;
    }
    let observed = 0;
    for (const v of all) if (!Number.isNaN(v)) observed++;
    let centring: CovariateCentring = {};
    if (observed > 0) {
      const { mean } = centreCovariate(all, name);
      const range = covariateRange(all);
      let simMean: number | undefined;
      if (range > 0) {
        const sims = used.map((c) => similarityMean(centreCovariate(c as Float64Array, name, mean).centred, range));
        simMean = sims.reduce((s, v) => s + v, 0) / sims.length;
      }
      centring = { mean, range, ...(simMean !== undefined ? { similarityMean: simMean } : {}) };
    }
    for (let m = 0; m < M - 1; m++) {
      periods[m].values[name] = columnFor(m) as Float64Array;
      periods[m].centring[name] = centring;
    }
  }
  return periods;
}
