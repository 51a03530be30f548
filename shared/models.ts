/**
 * Models and fits: the API contract (zod schemas of request bodies, response types).
 *
 * A ModelSpec names the periods it covers (period m runs from wave m to wave m + 1, numbered from 1),
 * one rate per covered period and a list of effects from shared/effects.ts; each rate and each effect
 * parameter is estimated (with an optional starting value) or fixed at a value. A Fit is one estimation
 * of a ModelSpec by the method of moments (a background job), or a "fixed" fit whose values are entered
 * by hand, so batches can simulate it.
 *
 * Endpoints (under /api, auth as in shared/api.ts):
 *   GET    /studies/:studyId/models                                  -> { models: ModelSummary[] }       (members)
 *   POST   /studies/:studyId/models                ModelSpecBody     -> { model: ModelDetail } 201       (lead, statistician)
 *   GET    /studies/:studyId/models/:modelId                         -> { model: ModelDetail }           (members)
 *   PATCH  /studies/:studyId/models/:modelId       ModelUpdateBody   -> { model: ModelDetail }           (lead, statistician)
 *   POST   /studies/:studyId/models/check          ModelSpecBody     -> { notes: ModelNote[] }           (members; checks, stores nothing)
 *   GET    /studies/:studyId/models/:modelId/fits                    -> { fits: FitSummary[] }           (members)
 *   POST   /studies/:studyId/models/:modelId/fits  StartFitBody      -> { fit: FitDetail } 201           (lead, statistician)
 *   GET    /studies/:studyId/models/:modelId/fits/:fitId             -> { fit: FitDetail }               (members)
 *   POST   /studies/:studyId/models/:modelId/fits/:fitId/cancel      -> { fit: FitDetail }               (lead, statistician)
 *
 * Refusals: 400 validation_failed with details.fields keyed by the body path ("effects.2.covariate",
 * "rates.0") for a model that does not suit the study's data: no density effect, a covariate missing or
 * of the wrong kind, a period without any change whose rate is estimated, an estimated parameter whose
 * statistic is at its bound (METHODS.md 8.5-8.6).
 *
 * Sources: Snijders (2001) The statistical evaluation of social network dynamics, Sociological
 * Methodology 31 (method of moments); METHODS.md section 4.
 */
import { z } from 'zod';
import { EFFECT_IDS, effectInfo, type EffectId } from './effects';
import { PLAIN_LINE_MESSAGE, PLAIN_TEXT_MESSAGE, isPlainLine, isPlainText } from './plainText';

export const MAX_MODEL_EFFECTS = 40;
export const DEFAULT_PHASE3_RUNS = 1000;
export const MIN_PHASE3_RUNS = 50;
export const MAX_PHASE3_RUNS = 5000;
/** Largest rate accepted as a value (expected opportunities per actor and period). */
export const MAX_RATE = 10_000;
/** Largest |value| of an effect parameter. */
export const MAX_PARAMETER = 40;

/** Common-practice convergence thresholds: every |t| below 0.1 and the overall maximum ratio below 0.25. */
export const CONVERGENCE_T_LIMIT = 0.1;
export const TAU_MAX_LIMIT = 0.25;
/** Estimate correlations beyond this (in absolute value) are flagged in the heat grid. */
export const HIGH_CORRELATION = 0.9;

export const FIT_STATES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type FitState = (typeof FIT_STATES)[number];

// ---------- request bodies ----------
const finite = (what: string) =>
  z.number({ error: `${what} must be a number.` }).refine(Number.isFinite, `${what} must be a finite number.`);

export const rateSpecSchema = z
  .object({
    period: z.number({ error: 'A period is a whole number.' }).int('A period is a whole number.').min(1, 'Periods are numbered from 1.'),
    estimate: z.boolean({ error: 'Say whether the rate is estimated (true) or fixed (false).' }),
    /** Starting value when estimated (optional), the value when fixed. */
    value: finite('A rate')
      .refine((v) => v > 0, 'A rate must be greater than 0.')
      .refine((v) => v <= MAX_RATE, `A rate may be at most ${MAX_RATE}.`)
      .optional(),
  })
  .superRefine((r, ctx) => {
    if (!r.estimate && r.value === undefined) {
      ctx.addIssue({ code: 'custom', path: ['value'], message: 'A fixed rate needs a value.' });
    }
  });
export type RateSpec = z.infer<typeof rateSpecSchema>;

export const effectSpecSchema = z
  .object({
    id: z.enum(EFFECT_IDS, { error: `The effect must be one of: ${EFFECT_IDS.join(', ')}.` }),
    covariate: z.string().trim().min(1, 'Choose a covariate.').max(60).refine(isPlainLine, `A covariate name ${PLAIN_LINE_MESSAGE}.`).optional(),
    estimate: z.boolean({ error: 'Say whether the parameter is estimated (true) or fixed (false).' }),
    /** Starting value when estimated (optional), the value when fixed. */
    value: finite('A parameter value')
      .refine((v) => Math.abs(v) <= MAX_PARAMETER, `A parameter value must lie between -${MAX_PARAMETER} and ${MAX_PARAMETER}.`)
      .optional(),
  })
  .superRefine((e, ctx) => {
    const info = effectInfo(e.id);
    if (info.covariate === 'none' && e.covariate !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['covariate'], message: `${info.label} takes no covariate.` });
    }
    if (info.covariate !== 'none' && e.covariate === undefined) {
      ctx.addIssue({ code: 'custom', path: ['covariate'], message: `${info.label} needs a ${info.covariate} covariate; choose one.` });
    }
    if (!e.estimate && e.value === undefined) {
      ctx.addIssue({ code: 'custom', path: ['value'], message: 'A fixed parameter needs a value.' });
    }
  });
export type EffectSpecInput = z.infer<typeof effectSpecSchema>;

const modelFields = {
  name: z
    .string({ error: 'Give the model a name.' })
    .trim()
    .min(1, 'Give the model a name.')
    .max(120, 'A model name may have at most 120 characters.')
    .refine(isPlainLine, `A model name ${PLAIN_LINE_MESSAGE}.`),
  description: z.string().trim().max(2000, 'The description may have at most 2000 characters.').refine(isPlainText, `The description ${PLAIN_TEXT_MESSAGE}.`).default(''),
  rates: z
    .array(rateSpecSchema, { error: 'Give one rate per period the model covers.' })
    .min(1, 'A model covers at least one period (wave m to wave m + 1).')
    .max(50),
  effects: z
    .array(effectSpecSchema, { error: 'Give the effects as a list.' })
    .min(1, 'A model needs at least the density effect.')
    .max(MAX_MODEL_EFFECTS, `A model may have at most ${MAX_MODEL_EFFECTS} effects.`),
};

type ModelShape = { rates: RateSpec[]; effects: EffectSpecInput[] };

function refineModel(body: ModelShape, ctx: z.RefinementCtx): void {
  if (!body.effects.some((e) => e.id === 'density')) {
    ctx.addIssue({
      code: 'custom',
      path: ['effects'],
      message: 'A model needs at least the density effect (it sets how many ties people keep).',
    });
  }
  const seen = new Map<string, number>();
  body.effects.forEach((e, k) => {
    const key = e.covariate ? `${e.id}:${e.covariate}` : e.id;
    if (seen.has(key)) {
      ctx.addIssue({ code: 'custom', path: ['effects', k, 'id'], message: `${effectInfo(e.id).label}${e.covariate ? ` (${e.covariate})` : ''} is already in the model.` });
    }
    seen.set(key, k);
  });
  const periods = new Set<number>();
  body.rates.forEach((r, k) => {
    if (periods.has(r.period)) ctx.addIssue({ code: 'custom', path: ['rates', k, 'period'], message: `Period ${r.period} is listed twice.` });
    periods.add(r.period);
  });
}

export const modelSpecBodySchema = z.object(modelFields).superRefine(refineModel);
export type ModelSpecBody = z.input<typeof modelSpecBodySchema>;
export type ParsedModelSpecBody = z.output<typeof modelSpecBodySchema>;

/** PATCH: any of the fields; the merged model is validated again as a whole. */
export const modelUpdateBodySchema = z
  .object({
    name: modelFields.name.optional(),
    description: z.string().trim().max(2000, 'The description may have at most 2000 characters.').refine(isPlainText, `The description ${PLAIN_TEXT_MESSAGE}.`).optional(),
    rates: modelFields.rates.optional(),
    effects: modelFields.effects.optional(),
  })
  .refine((b) => Object.keys(b).length > 0, 'Send at least one field to change.');
export type ModelUpdateBody = z.input<typeof modelUpdateBodySchema>;

/** An optional seed (a whole number from 0); without it the server draws one and stores it. */
export const seedSchema = z
  .number({ error: 'The seed must be a whole number.' })
  .int('The seed must be a whole number.')
  .min(0, 'The seed must be 0 or more.')
  .max(Number.MAX_SAFE_INTEGER)
  .optional();

export const startFitBodySchema = z.object({
  /** 'estimate' (default): method of moments. 'fixed': store the given values as a fit, no estimation. */
  mode: z.enum(['estimate', 'fixed'], { error: 'The mode must be "estimate" or "fixed".' }).default('estimate'),
  seed: seedSchema,
  phase3Runs: z
    .number({ error: 'The number of Phase 3 runs must be a whole number.' })
    .int('The number of Phase 3 runs must be a whole number.')
    .min(MIN_PHASE3_RUNS, `Use at least ${MIN_PHASE3_RUNS} Phase 3 runs (${DEFAULT_PHASE3_RUNS} is usual).`)
    .max(MAX_PHASE3_RUNS, `At most ${MAX_PHASE3_RUNS} Phase 3 runs.`)
    .default(DEFAULT_PHASE3_RUNS),
  /** Continue from the estimates (and derivative matrix) of an earlier fit of the same model. */
  startFrom: z.number({ error: 'startFrom is a fit id.' }).int().positive().optional(),
  /**
   * For mode 'fixed': values by parameter key ("rate:1" for the rate of period 1, "density",
   * "covariate_alter:age", ...); parameters not listed take the model's value.
   */
  values: z.record(z.string(), finite('A value')).optional(),
});
export type StartFitBody = z.input<typeof startFitBodySchema>;
export type ParsedStartFitBody = z.output<typeof startFitBodySchema>;

// ---------- responses ----------
/** A check result: errors block saving or fitting, warnings are shown. */
export interface ModelNote {
  severity: 'error' | 'warning';
  code: string;
  /** Body path the note belongs to ("rates.0", "effects.2.covariate", "" for the model). */
  path: string;
  message: string;
}

export interface ModelEffect {
  id: EffectId;
  covariate?: string;
  /** "density", "covariate_alter:age" */
  key: string;
  label: string;
  estimate: boolean;
  value: number | null;
}

export interface ModelRate {
  period: number;
  /** "rate:1" */
  key: string;
  label: string;
  estimate: boolean;
  value: number | null;
}

export interface FitBrief {
  id: number;
  state: FitState;
  mode: 'estimate' | 'fixed';
  converged: boolean | null;
  createdAt: string;
}

export interface ModelSummary {
  id: number;
  studyId: number;
  name: string;
  description: string;
  periods: number[];
  effectCount: number;
  estimatedCount: number;
  fitCount: number;
  latestFit: FitBrief | null;
  createdBy: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface ModelDetail extends ModelSummary {
  rates: ModelRate[];
  effects: ModelEffect[];
  /** Checks against the study's data now (warnings; errors only when the data changed since saving). */
  notes: ModelNote[];
}

export interface FitProgress {
  /** 0 = waiting to start, 1..3 the phase. */
  phase: 0 | 1 | 2 | 3;
  /** Phase 2 sub-phase 1..4; in Phase 3 the continuation round (2, 3, ...), 0 in the first round. */
  subphase: number;
  /** Runs (Phases 1 and 3) or iterations (Phase 2) done in the current phase or sub-phase. */
  iteration: number;
  /** Runs planned in the current phase (the most a Phase 2 sub-phase may take). */
  planned: number;
  /** Rough fraction of the whole work, 0..1. */
  fraction: number;
}

export interface FitParameter {
  key: string;
  kind: 'rate' | 'objective';
  label: string;
  effectId: EffectId | null;
  covariate: string | null;
  period: number | null;
  estimated: boolean;
  /** The estimate, or the fixed value. */
  value: number;
  se: number | null;
  /** Convergence t-ratio of its statistic (estimated parameters only). */
  convergenceT: number | null;
  /** value / se. */
  wald: number | null;
}

export interface FitResults {
  parameters: FitParameter[];
  /** Keys of the estimated parameters, the order of the matrices. */
  estimatedKeys: string[];
  covariance: number[][] | null;
  /** Correlations of the estimates (null entries where a variance is 0). */
  correlation: (number | null)[][] | null;
  tauMax: number | null;
  maxAbsT: number | null;
  converged: boolean;
  conditionNumber: number | null;
  /** Phase 3 derivative matrix of the statistics by the estimated parameters (reused when a fit continues). */
  derivative: number[][] | null;
  /** Periods simulated in all phases. */
  simulatedPeriods: number;
  phase2Iterations: number[];
  /**
   * Rounds the fit took: 1, or more when it continued automatically from its estimates (each round one
   * Phase 3 check); absent in results stored before rounds existed.
   */
  rounds?: number;
  /** The round budget the fit had. */
  roundBudget?: number;
  seconds: number;
  warnings: string[];
  /** Observed and Phase 3 mean statistics of the estimated parameters. */
  target: number[];
  meanStatistics: number[];
}

export interface FitSummary {
  id: number;
  modelId: number;
  studyId: number;
  mode: 'estimate' | 'fixed';
  state: FitState;
  seed: number;
  phase3Runs: number;
  startFrom: number | null;
  converged: boolean | null;
  tauMax: number | null;
  error: string | null;
  createdBy: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

export interface FitDetail extends FitSummary {
  progress: FitProgress | null;
  /** The job log, one line per event, oldest first. */
  log: string[];
  results: FitResults | null;
}

/** Plain label of a parameter key as the model form shows it. */
export function parameterLabel(key: string): string {
  if (key.startsWith('rate:')) return `Rate, period ${key.slice(5)}`;
  const [id, covariate] = key.split(':');
  try {
    const label = effectInfo(id as EffectId).label;
    return covariate ? `${label} (${covariate})` : label;
  } catch {
    return key;
  }
}

/** Whether a fit meets the common-practice convergence thresholds. */
export function meetsConvergence(tRatios: ReadonlyArray<number | null>, tauMax: number | null): boolean {
  return tauMax !== null && tauMax < TAU_MAX_LIMIT && tRatios.every((t) => t !== null && Math.abs(t) < CONVERGENCE_T_LIMIT);
}
