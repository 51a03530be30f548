/**
 * Explore the process: the API contract (zod schemas of the query strings, response types).
 *
 * Endpoints (under /api, members of the study; non-members get 404):
 *   GET /studies/:studyId/explore/fits/:fitId/choices?period=&actor=     -> ChoiceResponse
 *   GET /studies/:studyId/explore/fits/:fitId/overview?period=&order=    -> OverviewResponse
 *   GET /studies/:studyId/explore/batches/:batchId/replay?period=&chain= -> ReplayResponse      (batch done)
 *   GET /studies/:studyId/explore/batches/:batchId/timelines?period=&pairs=0-1,2-3&chains=&points=
 *                                                                        -> TimelinesResponse   (batch done)
 *
 * Actors are 0-based indices into `actors`; chains are numbered from 1 as in the batch CSV; periods
 * from 1 (period m runs from wave m to wave m + 1). Everything is recomputed from the stored seeds.
 */
import { z } from 'zod';

const wholeNumber = (what: string, min: number) =>
  z
    .string({ error: `Give ${what} as a whole number.` })
    .trim()
    .regex(/^[0-9]{1,9}$/, `${what[0].toUpperCase()}${what.slice(1)} must be a whole number.`)
    .transform(Number)
    .refine((v) => v >= min, `${what[0].toUpperCase()}${what.slice(1)} must be at least ${min}.`);

export const choiceQuerySchema = z.object({
  period: wholeNumber('the period', 1),
  actor: wholeNumber('the actor', 0),
});

/** Actor order of the overview: "cluster" (by similar ties at the start wave) or "covariate:<name>". */
export const overviewQuerySchema = z.object({
  period: wholeNumber('the period', 1),
  order: z
    .string()
    .trim()
    .regex(/^(cluster|index|covariate:.{1,60})$/, 'The order is "cluster", "index" or "covariate:<name>".')
    .optional()
    .default('cluster'),
});

export const replayQuerySchema = z.object({
  period: wholeNumber('the period', 1),
  chain: wholeNumber('the chain', 1),
});

export const MAX_TIMELINE_PAIRS = 12;
export const MAX_TIMELINE_POINTS = 201;
export const DEFAULT_TIMELINE_POINTS = 51;

export const timelinesQuerySchema = z.object({
  period: wholeNumber('the period', 1),
  pairs: z
    .string({ error: 'Give the pairs as sender-receiver indices, e.g. pairs=0-1,2-3.' })
    .trim()
    .regex(/^[0-9]{1,5}-[0-9]{1,5}(,[0-9]{1,5}-[0-9]{1,5})*$/, 'Give the pairs as sender-receiver indices, e.g. pairs=0-1,2-3.')
    .transform((s) => s.split(',').map((p) => p.split('-').map(Number) as [number, number]))
    .refine((p) => p.length <= MAX_TIMELINE_PAIRS, `At most ${MAX_TIMELINE_PAIRS} pairs at once.`),
  /** How many chains to re-simulate (the first ones); all of the batch's by default. */
  chains: wholeNumber('the number of chains', 1).optional(),
  points: wholeNumber('the number of time points', 2)
    .refine((v) => v <= MAX_TIMELINE_POINTS, `At most ${MAX_TIMELINE_POINTS} time points.`)
    .optional(),
});

export interface ExploreEffect {
  key: string;
  label: string;
  value: number;
}

export interface ChoiceOptionDto {
  /** Alter index, or null for "no change". */
  alter: number | null;
  /** 1 when the tie exists at the start (choosing it dissolves it). */
  tie: 0 | 1;
  /** 1 when the alter has a tie to the actor (choosing it would reciprocate). */
  tieBack: 0 | 1;
  probability: number;
  utility: number;
  /** beta_k * delta_ijk per effect, in `effects` order. */
  contributions: number[];
}

export interface ChoiceResponse {
  fitId: number;
  period: number;
  actor: number;
  actors: string[];
  effects: ExploreEffect[];
  rate: number;
  /** Periods the fit has a rate for. */
  coveredPeriods: number[];
  /** Alters not offered because the pair is fixed in this period or the alter is absent (left out of `options`). */
  fixedLeftOut: number;
  /** Every option, most likely first. */
  options: ChoiceOptionDto[];
  /** Whether the fit converged (a caption warns when it did not). */
  converged: boolean | null;
}

export interface OverviewResponse {
  fitId: number;
  period: number;
  actors: string[];
  /** Actor indices in display order (rows and columns). */
  order: number[];
  orderBy: string;
  /** Covariates that can order the actors. */
  orderChoices: { value: string; label: string }[];
  /** probabilities[i][j]: actor i's first-ministep probability of toggling i->j; [i][i] = "no change". */
  probabilities: number[][];
  /** Ties at the start wave, [sender, receiver]. */
  startTies: Array<[number, number]>;
  /** Actors absent in this period (their rows are all "no change"; nobody may choose them). */
  absent: number[];
  /** Ordered pairs between present actors that are fixed in this period (never offered). */
  fixedPairs: number;
  coveredPeriods: number[];
  converged: boolean | null;
}

export interface ReplayResponse {
  batchId: number;
  period: number;
  chain: number;
  chains: number;
  actors: string[];
  /** Node positions in [0, 1]^2 (seeded layout of the start and observed end ties together). */
  positions: Array<[number, number]>;
  startTies: Array<[number, number]>;
  observedEndTies: Array<[number, number]>;
  /** Pairs not observed at the end wave (left out of the distance). */
  unobservedEnd: Array<[number, number]>;
  /** Ministeps as columns: time in (0, 1), actor, alter (-1 = no change), sign (+1 created, -1 dissolved, 0). */
  steps: { t: number[]; actor: number[]; alter: number[]; sign: number[] };
  ministeps: number;
  changes: number;
  /** Distance (ordered pairs that differ, observed pairs only) to the observed end wave, at the start and at the end of the chain. */
  distanceStart: number;
  distanceEnd: number;
  /** True when the re-simulated chain's end statistics equal the row the batch stored for this chain. */
  matchesStored: boolean;
  rate: number;
}

export interface TimelinePairDto {
  from: number;
  to: number;
  observedStart: 0 | 1;
  /** null when the pair was not observed at the end wave. */
  observedEnd: 0 | 1 | null;
  /** Share of chains with the tie at each grid time. */
  shares: number[];
  /** The batch's stored share of end networks with this tie (all its chains). */
  storedEndShare: number;
}

export interface TimelinesResponse {
  batchId: number;
  period: number;
  /** Chains re-simulated (the first `chains` of the batch). */
  chains: number;
  batchChains: number;
  grid: number[];
  actors: string[];
  pairs: TimelinePairDto[];
}
