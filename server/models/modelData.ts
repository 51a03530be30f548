/**
 * From a study's stored data and a model specification to what the estimator needs: the covered
 * periods' networks (missing ties imputed as the batches do, METHODS.md 1.4), each period's covariates
 * with the study-wide centring, the parameter plans, and the checks of the model against the data.
 */
import { effectInfo, type EffectId } from '../../shared/effects';
import type { EffectSpecInput, ModelNote, RateSpec } from '../../shared/models';
import { periodCovariates, periodNetworks } from '../data/periods';
import type { LoadedStudyData } from '../data/store';
import { buildEffects, type CovariateCentring, type CovariateValues, type EffectSpec } from '../engine/effects';
import { checkModelData, type ParameterPlan, type PeriodInput } from '../engine/estimate';

/** A model's estimable content, as stored in model_specs.spec and fits.spec. */
export interface StoredSpec {
  rates: RateSpec[];
  effects: EffectSpecInput[];
}

/** One covered period, structured-cloneable (sent to the worker thread). */
export interface FitPeriodData {
  period: number;
  label: string;
  start: Uint8Array;
  end: Uint8Array;
  endMissing: Uint8Array | null;
  /** Pairs fixed in this period (0) and active actors (1); null when all are free / active. */
  free: Uint8Array | null;
  active: Uint8Array | null;
  covariates: Record<string, CovariateValues>;
  centring: Record<string, CovariateCentring>;
}

export function effectKey(e: { id: string; covariate?: string }): string {
  return e.covariate ? `${e.id}:${e.covariate}` : e.id;
}

export function rateKey(period: number): string {
  return `rate:${period}`;
}

export function effectSpecs(spec: StoredSpec): EffectSpec[] {
  return spec.effects.map((e) => (e.covariate ? { id: e.id as EffectId, covariate: e.covariate } : { id: e.id as EffectId }));
}

/** Rates sorted by period, so parameters always list periods in order. */
export function sortedRates(spec: StoredSpec): RateSpec[] {
  return [...spec.rates].sort((a, b) => a.period - b.period);
}

/** The covered periods' data; throws "model-data: ..." for a period the study does not have. */
export function fitPeriods(data: LoadedStudyData, spec: StoredSpec): FitPeriodData[] {
  const networks = periodNetworks(data);
  const covariates = periodCovariates(data);
  return sortedRates(spec).map((r) => {
    const net = networks[r.period - 1];
    if (!net) throw new Error(`model-data: the study has no period ${r.period}`);
    return {
      period: r.period,
      label: `${data.waveLabels[r.period - 1]} to ${data.waveLabels[r.period]}`,
      start: net.start,
      end: net.end,
      endMissing: net.endMissing,
      free: net.free,
      active: net.active,
      covariates: covariates[r.period - 1].values,
      centring: covariates[r.period - 1].centring,
    };
  });
}

/** Builds each period's effects (the engine's objects) from plain period data. */
export function periodInputs(periods: FitPeriodData[], spec: StoredSpec): PeriodInput[] {
  const specs = effectSpecs(spec);
  return periods.map((p) => ({
    start: p.start,
    end: p.end,
    ...(p.endMissing ? { endMissing: p.endMissing } : {}),
    ...(p.free ? { free: p.free } : {}),
    ...(p.active ? { active: p.active } : {}),
    effects: buildEffects(specs, p.covariates, p.centring),
    label: p.label,
  }));
}

export function ratePlans(spec: StoredSpec): ParameterPlan[] {
  return sortedRates(spec).map((r) => ({ estimate: r.estimate, ...(r.value !== undefined ? { value: r.value } : {}) }));
}

export function paramPlans(spec: StoredSpec): ParameterPlan[] {
  return spec.effects.map((e) => ({ estimate: e.estimate, ...(e.value !== undefined ? { value: e.value } : {}) }));
}

/**
 * Everything wrong with a model for this study's data, as notes keyed by body path: periods the study
 * does not have, covariates missing or of the wrong kind, a similarity covariate without spread, then
 * (when those pass) the pre-fit checks of the estimator (zero change, statistics at their bounds,
 * warnings on large change).
 */
export function checkSpecAgainstData(data: LoadedStudyData, spec: StoredSpec): ModelNote[] {
  const notes: ModelNote[] = [];
  const periodCount = data.waves.length - 1;
  spec.rates.forEach((r, k) => {
    if (r.period > periodCount) {
      notes.push({
        severity: 'error',
        code: 'no_such_period',
        path: `rates.${k}.period`,
        message: `The study has ${periodCount} period${periodCount === 1 ? '' : 's'} (${data.waves.length} waves); there is no period ${r.period}.`,
      });
    }
  });
  const names = Object.keys(data.covariates);
  spec.effects.forEach((e, k) => {
    const info = effectInfo(e.id as EffectId);
    if (info.covariate === 'none' || !e.covariate) return;
    const cov = data.covariates[e.covariate];
    if (!cov) {
      notes.push({
        severity: 'error',
        code: 'missing_covariate',
        path: `effects.${k}.covariate`,
        message: `The study has no covariate "${e.covariate}" (it has ${names.length ? names.map((n) => `"${n}"`).join(', ') : 'none'}).`,
      });
      return;
    }
    if (cov.kind !== info.covariate) {
      notes.push({
        severity: 'error',
        code: 'covariate_kind',
        path: `effects.${k}.covariate`,
        message: `"${e.covariate}" is ${cov.kind}, but ${info.label} needs a ${info.covariate} covariate.`,
      });
    }
  });
  if (notes.length > 0) return notes;

  const periods = fitPeriods(data, spec);
  let inputs: PeriodInput[];
  try {
    inputs = periodInputs(periods, spec);
  } catch (error) {
    const message = (error as Error).message.replace(/^effects: /, '');
    const k = spec.effects.findIndex((e) => e.covariate && message.includes(`"${e.covariate}"`));
    notes.push({
      severity: 'error',
      code: 'effect_unusable',
      path: k >= 0 ? `effects.${k}.covariate` : 'effects',
      message: `This effect cannot be used with the study's data: ${message}.`,
    });
    return notes;
  }
  // checkModelData reports rates by position in the sorted list; map back to body positions.
  const sorted = sortedRates(spec);
  const bodyIndex = sorted.map((r) => spec.rates.indexOf(r));
  for (const note of checkModelData(inputs, ratePlans(spec), paramPlans(spec), periods.map((p) => `${p.label} (period ${p.period})`))) {
    let path = note.path;
    const m = /^rates\.(\d+)$/.exec(path);
    if (m) path = `rates.${bodyIndex[Number(m[1])]}`;
    notes.push({ severity: note.severity, code: note.code, path, message: note.message });
  }
  return notes;
}
