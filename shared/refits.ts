/**
 * Re-fit studies: the API contract (request body schema, response types).
 *
 * A re-fit study takes 1 to 4 finished fits of a Study, simulates R panels from each fit's estimates
 * (starting at the observed first wave of the covered periods, period by period), fits the same model
 * again to every simulated panel (and, when asked, the other chosen models too) and summarises the
 * estimates: bias, spread, mean standard error, their ratio, 95% interval coverage, each with its
 * Monte Carlo error, the share of re-fits that converged and the correlations of the estimates.
 *
 * Endpoints (under /api):
 *   GET  /studies/:studyId/refits                          -> { refits: RefitSummary[] }   (members)
 *   POST /studies/:studyId/refits        CreateRefitBody   -> { refit: RefitSummary } 201  (lead, statistician)
 *   GET  /studies/:studyId/refits/:refitId                 -> { refit: RefitSummary }      (members)
 *   POST /studies/:studyId/refits/:refitId/cancel          -> { refit: RefitSummary }      (lead, statistician)
 *   GET  /studies/:studyId/refits/:refitId/results?include=converged|all -> RefitResults (members; 409 until done)
 *   GET  /studies/:studyId/refits/:refitId/results.csv     -> text/csv (members)
 *
 * Sources: Snijders (2001) The statistical evaluation of social network dynamics, Sociological
 * Methodology 31 (the estimator and its asymptotic normality, which the coverage check relies on);
 * Monte Carlo errors of the summaries as in Morris, White & Crowther (2019) Using simulation studies
 * to evaluate statistical methods, Statistics in Medicine 38 (formulas from memory).
 */
import { z } from 'zod';
import { seedSchema } from './models';

export const MIN_REPLICATIONS = 20;
export const MAX_REPLICATIONS = 1000;
export const MAX_REFIT_FITS = 4;
/** Below this share of converged re-fits the results carry a caution. */
export const LOW_CONVERGENCE_SHARE = 0.9;
/** Estimate correlations beyond this (in absolute value) are flagged in words. */
export const HIGH_REFIT_CORRELATION = 0.9;
export const DEFAULT_REFIT_PHASE3_RUNS = 500;

export const createRefitBodySchema = z.object({
  fitIds: z
    .array(z.number({ error: 'Fit ids are whole numbers.' }).int('Fit ids are whole numbers.').positive('Fit ids are whole numbers.'), {
      error: 'Choose the fits as a list of fit ids.',
    })
    .min(1, 'Choose at least one fit.')
    .max(MAX_REFIT_FITS, `Choose at most ${MAX_REFIT_FITS} fits.`)
    .refine((ids) => new Set(ids).size === ids.length, 'A fit is listed twice.'),
  replications: z
    .number({ error: 'The number of simulated panels must be a whole number.' })
    .int('The number of simulated panels must be a whole number.')
    .min(MIN_REPLICATIONS, `Simulate at least ${MIN_REPLICATIONS} panels per fit.`)
    .max(MAX_REPLICATIONS, `Simulate at most ${MAX_REPLICATIONS} panels per fit.`),
  /** Also fit every other chosen model to each fit's simulated panels. */
  cross: z.boolean({ error: 'cross is true or false.' }).default(false),
  seed: seedSchema,
  phase3Runs: z
    .number({ error: 'The number of Phase 3 runs must be a whole number.' })
    .int('The number of Phase 3 runs must be a whole number.')
    .min(50, 'Use at least 50 Phase 3 runs per re-fit.')
    .max(5000, 'At most 5000 Phase 3 runs per re-fit.')
    .default(DEFAULT_REFIT_PHASE3_RUNS),
  label: z.string().trim().max(120, 'A label may have at most 120 characters.').optional(),
});
export type CreateRefitBody = z.input<typeof createRefitBodySchema>;
export type ParsedCreateRefitBody = z.output<typeof createRefitBodySchema>;

export type RefitState = 'queued' | 'running' | 'done' | 'failed' | 'cancelled';

/** One chosen fit as the study copied it. */
export interface RefitModelInfo {
  fitId: number;
  modelId: number;
  /** "Model name (fit 12)". */
  name: string;
  /** Parameter keys in model order (rates, then effects) and their labels. */
  keys: string[];
  labels: string[];
  /** The fit's values (estimates or fixed values), in `keys` order: the truth of its simulated panels. */
  values: number[];
  /** Whether each parameter is estimated in a re-fit. */
  estimated: boolean[];
  converged: boolean;
  /** The fit's values were entered by hand (nothing was estimated). */
  handEntered: boolean;
}

export interface RefitSummary {
  id: number;
  studyId: number;
  label: string;
  state: RefitState;
  models: RefitModelInfo[];
  replications: number;
  cross: boolean;
  seed: number;
  phase3Runs: number;
  /** Re-fits done / planned. */
  refitsDone: number;
  refitsTotal: number;
  secondsLeft: number | null;
  error: string | null;
  createdBy: string | null;
  createdAt: string;
  finishedAt: string | null;
  log: string;
}

export interface McValue {
  value: number | null;
  /** Monte Carlo standard error of `value`. */
  mcError: number | null;
}

export interface RefitParameterSummary {
  key: string;
  label: string;
  /** The data-generating value (the source fit's value; 0 for an effect the source model does not have). */
  truth: number;
  /** How many re-fits the figures use. */
  count: number;
  meanEstimate: number | null;
  bias: McValue;
  sd: McValue;
  meanSe: McValue;
  /** SD of the estimates divided by the mean SE (1 when the SEs are right). */
  ratio: McValue;
  /** Share of re-fits whose estimate +- 1.96 SE covers the truth. */
  coverage: McValue;
  /** The estimates used, in replication order (for the plots). */
  estimates: number[];
}

export interface RefitCorrelation {
  a: string;
  b: string;
  r: number | null;
  flagged: boolean;
}

/** The re-fits of one target model to the panels simulated from one source model. */
export interface RefitGroup {
  source: number;
  target: number;
  /** "A re-fitted to panels of A", "B fitted to panels of A". */
  title: string;
  refits: number;
  converged: number;
  failed: number;
  convergedShare: number | null;
  parameters: RefitParameterSummary[];
  correlations: RefitCorrelation[];
  /** Plain sentences: low convergence, few re-fits, high correlations, biased parameters. */
  cautions: string[];
}

export interface RefitResults {
  refit: RefitSummary;
  include: 'converged' | 'all';
  groups: RefitGroup[];
}

export const REFIT_INCLUDE = ['converged', 'all'] as const;
