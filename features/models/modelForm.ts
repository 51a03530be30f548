/**
 * The model form's state and its pure logic: the rows of rates and effects (from the study data and
 * an existing model), the request body they stand for, and where each message belongs on the form.
 */
import type { CovariateInfo, StudyDataResponse } from '../../shared/data';
import { EFFECT_CATALOGUE, type EffectId, type EffectInfo } from '../../shared/effects';
import type { ModelDetail, ModelSpecBody } from '../../shared/models';

export type Mode = 'estimate' | 'fix';

export interface RateRow {
  period: number;
  included: boolean;
  mode: Mode;
  value: string;
}

export interface EffectRow {
  key: string;
  id: EffectId;
  covariate?: string;
  included: boolean;
  mode: Mode;
  value: string;
}

/** Messages per form row ("rate:1", "density", "covariate_alter:age") and for the form as a whole. */
export interface RowMessages {
  byRow: Record<string, { text: string; severity: 'error' | 'warning' }[]>;
  general: { text: string; severity: 'error' | 'warning' }[];
}

export const rowKeyOf = (id: string, covariate?: string) => (covariate ? `${id}:${covariate}` : id);

export const toNumber = (s: string): number => Number(s.trim().replace(',', '.').replace('\u2212', '-'));

/** The effect rows the study's covariates allow: one per structural effect, one per usable covariate. */
export function effectRowsFor(covariates: CovariateInfo[]): { info: EffectInfo; covariate?: string }[] {
  const out: { info: EffectInfo; covariate?: string }[] = [];
  for (const info of EFFECT_CATALOGUE) {
    if (info.covariate === 'none') out.push({ info });
    else for (const c of covariates.filter((cov) => cov.kind === info.covariate)) out.push({ info, covariate: c.name });
  }
  return out;
}

export function initialRates(data: StudyDataResponse, model: ModelDetail | undefined): RateRow[] {
  const periods = Math.max(0, data.waves.length - 1);
  return Array.from({ length: periods }, (_, k) => {
    const r = model?.rates.find((x) => x.period === k + 1);
    if (model) return { period: k + 1, included: !!r, mode: r && !r.estimate ? 'fix' : 'estimate', value: r?.value != null ? String(r.value) : '' };
    return { period: k + 1, included: true, mode: 'estimate', value: '' };
  });
}

export function initialEffects(data: StudyDataResponse, model: ModelDetail | undefined): EffectRow[] {
  return effectRowsFor(data.covariates).map(({ info, covariate }) => {
    const key = rowKeyOf(info.id, covariate);
    const e = model?.effects.find((x) => x.key === key);
    if (model) return { key, id: info.id, covariate, included: !!e, mode: e && !e.estimate ? 'fix' : 'estimate', value: e?.value != null ? String(e.value) : '' };
    return { key, id: info.id, covariate, included: info.id === 'density' || info.id === 'reciprocity', mode: 'estimate', value: '' };
  });
}

/** The body the form stands for, and which row each body position came from. */
export function buildBody(name: string, description: string, rates: RateRow[], effects: EffectRow[]) {
  const rateRows = rates.filter((r) => r.included);
  const effectRows = effects.filter((e) => e.included);
  const body: ModelSpecBody = {
    name,
    description,
    rates: rateRows.map((r) => ({
      period: r.period,
      estimate: r.mode === 'estimate',
      ...(r.value.trim() !== '' || r.mode === 'fix' ? { value: r.value.trim() === '' ? undefined : toNumber(r.value) } : {}),
    })),
    effects: effectRows.map((e) => ({
      id: e.id,
      ...(e.covariate ? { covariate: e.covariate } : {}),
      estimate: e.mode === 'estimate',
      ...(e.value.trim() !== '' ? { value: toNumber(e.value) } : {}),
    })),
  };
  return { body, rateKeys: rateRows.map((r) => `rate:${r.period}`), effectKeys: effectRows.map((e) => e.key) };
}

/** Sorts messages keyed by body path ("effects.2.covariate") onto the form rows. */
export function messagesFor(
  entries: { path: string; text: string; severity: 'error' | 'warning' }[],
  rateKeys: string[],
  effectKeys: string[],
): RowMessages {
  const out: RowMessages = { byRow: {}, general: [] };
  for (const { path, text, severity } of entries) {
    const m = /^(rates|effects)\.(\d+)/.exec(path);
    const key = m ? (m[1] === 'rates' ? rateKeys : effectKeys)[Number(m[2])] : undefined;
    if (key) (out.byRow[key] ??= []).push({ text, severity });
    else if (path === 'rates' || path === 'effects') (out.byRow[`__${path}`] ??= []).push({ text, severity });
    else if (path !== 'name' && path !== 'description') out.general.push({ text, severity });
  }
  return out;
}
