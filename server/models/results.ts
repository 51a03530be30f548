/**
 * Turns the estimator's output into the stored FitResults (shared/models.ts): named parameters with
 * estimates, standard errors, convergence t-ratios and Wald ratios, the covariance and correlation
 * matrices, the convergence verdict; non-finite numbers become null so the JSON is exact.
 */
import type { EffectId } from '../../shared/effects';
import { CONVERGENCE_T_LIMIT, TAU_MAX_LIMIT, type FitParameter, type FitResults } from '../../shared/models';
import type { SaomFit } from '../engine/estimate';
import { effectKey, rateKey, sortedRates, type StoredSpec } from './modelData';
import { parameterLabel } from '../../shared/models';

const num = (x: number | null | undefined): number | null => (x === null || x === undefined || !Number.isFinite(x) ? null : x);

function effectLabel(e: StoredSpec['effects'][number]): string {
  return parameterLabel(effectKey(e));
}

/** Parameter rows in model order: rates by period, then effects. */
function parameterShells(spec: StoredSpec): Omit<FitParameter, 'value' | 'se' | 'convergenceT' | 'wald'>[] {
  return [
    ...sortedRates(spec).map((r) => ({
      key: rateKey(r.period),
      kind: 'rate' as const,
      label: `Rate, period ${r.period}`,
      effectId: null,
      covariate: null,
      period: r.period,
      estimated: r.estimate,
    })),
    ...spec.effects.map((e) => ({
      key: effectKey(e),
      kind: 'objective' as const,
      label: effectLabel(e),
      effectId: e.id as EffectId,
      covariate: e.covariate ?? null,
      period: null,
      estimated: e.estimate,
    })),
  ];
}

export function resultsFromFit(spec: StoredSpec, fit: SaomFit, seconds: number, roundBudget = 1): FitResults {
  const shells = parameterShells(spec);
  if (shells.length !== fit.parameters.length) {
    throw new Error(`fit: ${fit.parameters.length} fitted parameters for a model with ${shells.length}`);
  }
  const parameters: FitParameter[] = shells.map((shell, k) => {
    const p = fit.parameters[k];
    const se = num(p.se);
    return {
      ...shell,
      estimated: p.estimated,
      value: p.value,
      se,
      convergenceT: num(p.convergenceT),
      wald: se !== null && se > 0 ? p.value / se : null,
    };
  });
  const raw = fit.raw;
  const ts = raw.convergenceT.map((t) => Math.abs(t));
  const maxAbsT = ts.length ? Math.max(...ts) : null;
  const tauMax = num(raw.tauMax);
  return {
    parameters,
    estimatedKeys: parameters.filter((p) => p.estimated).map((p) => p.key),
    covariance: raw.covariance ? raw.covariance.map((row) => row.map((v) => (Number.isFinite(v) ? v : 0))) : null,
    correlation: raw.correlation ? raw.correlation.map((row) => row.map(num)) : null,
    tauMax,
    maxAbsT: num(maxAbsT),
    converged: maxAbsT !== null && Number.isFinite(maxAbsT) && maxAbsT < CONVERGENCE_T_LIMIT && tauMax !== null && tauMax < TAU_MAX_LIMIT,
    conditionNumber: num(raw.conditionNumber),
    derivative: raw.derivative.every((row) => row.every(Number.isFinite)) ? raw.derivative : null,
    simulatedPeriods: raw.simulatedPeriods,
    phase2Iterations: raw.phase2Iterations,
    rounds: raw.rounds.length,
    roundBudget,
    seconds,
    warnings: fit.warnings,
    target: raw.target,
    meanStatistics: raw.meanStatistics,
  };
}

/** Results of a fit whose values were entered by hand: no estimation, so no errors or diagnostics. */
export function resultsFromValues(spec: StoredSpec, values: Record<string, number>): FitResults {
  const parameters: FitParameter[] = parameterShells(spec).map((shell) => ({
    ...shell,
    estimated: false,
    value: values[shell.key],
    se: null,
    convergenceT: null,
    wald: null,
  }));
  return {
    parameters,
    estimatedKeys: [],
    covariance: null,
    correlation: null,
    tauMax: null,
    maxAbsT: null,
    converged: false,
    conditionNumber: null,
    derivative: null,
    simulatedPeriods: 0,
    phase2Iterations: [],
    seconds: 0,
    warnings: ['These values were entered by hand; nothing was estimated.'],
    target: [],
    meanStatistics: [],
  };
}
