/**
 * Simulation batches and goodness of fit: the API contract (zod schemas of request bodies, response types).
 *
 * A Batch simulates a fitted (or hand-entered) model many times from each observed start wave, stores
 * the auxiliary statistics of every Chain's end network and the per-tie frequencies, and compares them
 * with the observed end wave: envelopes, the Mahalanobis-distance test and consensus networks.
 *
 * Endpoints (under /api, auth as in shared/api.ts):
 *   GET    /studies/:studyId/batches                                   -> { batches: BatchSummary[] }     (members)
 *   POST   /studies/:studyId/batches           CreateBatchBody         -> { batch: BatchDetail }  201     (lead, statistician)
 *   GET    /studies/:studyId/batches/:batchId                          -> { batch: BatchDetail }          (members)
 *   POST   /studies/:studyId/batches/:batchId/cancel                   -> { batch: BatchDetail }          (lead, statistician)
 *   GET    /studies/:studyId/batches/:batchId/gof?statistic=&period=&coverage=0.5,0.9
 *                                                                      -> GofResponse                     (members; batch done)
 *   GET    /studies/:studyId/batches/:batchId/gof/summary?period=      -> GofSummaryResponse              (members; batch done)
 *   GET    /studies/:studyId/batches/:batchId/consensus?period=&threshold=0.5 | &top=1
 *                                                                      -> ConsensusResponse               (members; batch done)
 *   GET    /studies/:studyId/batches/:batchId/statistics.csv?statistic=&period=
 *                                                                      -> text/csv, one row per chain     (members; batch done)
 *
 * Periods are numbered from 1: period m runs from wave m to wave m + 1.
 *
 * Sources: Lospinoso & Snijders (2019) Goodness of fit for stochastic actor-oriented models,
 * Methodological Innovations 12(3); North, Curtis & Sham (2002) AJHG 71 (the p-value);
 * Hyndman & Fan (1996) (quantile rule 7); METHODS.md sections 3, 5 and 6.
 */
import { z } from 'zod';
import { AUX_STATISTIC_IDS, isAuxStatisticId, type AuxStatisticId } from './auxStatistics';
import { EFFECT_IDS, type EffectId } from './effects';
import { MAX_PARAMETER, MAX_RATE } from './models';
import { PLAIN_LINE_MESSAGE, isPlainLine } from './plainText';

export const DEFAULT_CHAINS = 1000;
export const MIN_CHAINS = 2;
export const MAX_CHAINS = 20_000;
/** Chains per unit of work handed to a worker thread. */
export const CHAINS_PER_CHUNK = 25;
export const MAX_DEGREE_LIMIT = 999;
export const DEFAULT_COVERAGES = [0.5, 0.9] as const;
/** Below this many chains every p-value gets a caution about its resolution. */
export const FEW_CHAINS = 500;

export const BATCH_STATES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type BatchState = (typeof BATCH_STATES)[number];

// ---------- request bodies ----------
const finite = (what: string) => z.number({ error: `${what} must be a number.` }).refine(Number.isFinite, `${what} must be a finite number.`);

export const inlineEffectSchema = z.object({
  id: z.enum(EFFECT_IDS, { error: `The effect id must be one of: ${EFFECT_IDS.join(', ')}.` }),
  covariate: z.string().trim().min(1).max(60).refine(isPlainLine, `A covariate name ${PLAIN_LINE_MESSAGE}.`).optional(),
  // The same bounds as a fit's parameters (shared/models.ts).
  value: finite('An effect value').refine((v) => Math.abs(v) <= MAX_PARAMETER, `An effect value must lie between -${MAX_PARAMETER} and ${MAX_PARAMETER}.`),
});
export type InlineEffect = z.infer<typeof inlineEffectSchema>;

/** A hand-entered model: one rate per period of the study and a value per effect. */
export const inlineModelSchema = z.object({
  rates: z
    .array(
      finite('A rate')
        .refine((v) => v > 0, 'A rate must be greater than 0.')
        .refine((v) => v <= MAX_RATE, `A rate may be at most ${MAX_RATE}.`),
      { error: 'Give the rates as a list of numbers, one per period.' },
    )
    .min(1, 'Give one rate per period.'),
  effects: z.array(inlineEffectSchema).min(1, 'A model needs at least one effect (usually density).').max(40, 'A model may have at most 40 effects.'),
});
export type InlineModel = z.infer<typeof inlineModelSchema>;

const chainsSchema = z
  .number({ error: 'The number of chains must be a whole number.' })
  .int('The number of chains must be a whole number.')
  .min(MIN_CHAINS, `Run at least ${MIN_CHAINS} chains (a covariance needs two; ${DEFAULT_CHAINS} is the usual choice).`)
  .max(MAX_CHAINS, `At most ${MAX_CHAINS} chains can be run in one batch.`);

export const createBatchBodySchema = z
  .object({
    /** Simulate a stored Fit's estimates. */
    fitId: z.number().int().positive().optional(),
    /** Or a hand-entered model. */
    model: inlineModelSchema.optional(),
    label: z.string().trim().max(120, 'A label may have at most 120 characters.').refine(isPlainLine, `A label ${PLAIN_LINE_MESSAGE}.`).optional(),
    /** Periods to simulate (from 1); default: every period. */
    periods: z
      .array(z.number().int('A period is a whole number.').min(1, 'Periods are numbered from 1.'))
      .min(1, 'Choose at least one period.')
      .max(50)
      .optional(),
    chains: chainsSchema.default(DEFAULT_CHAINS),
    /** Seed of the batch (0 .. 2^53 - 1); default: drawn at random and stored. */
    seed: z.number().int('The seed must be a whole number.').min(0, 'The seed must be 0 or more.').max(Number.MAX_SAFE_INTEGER).optional(),
    statistics: z
      .array(z.string())
      .min(1, 'Choose at least one statistic.')
      .superRefine((ids, ctx) => {
        const unknown = ids.filter((id) => !isAuxStatisticId(id));
        if (unknown.length) {
          ctx.addIssue({
            code: 'custom',
            message: `Unknown statistic${unknown.length > 1 ? 's' : ''} ${unknown.map((u) => `"${u}"`).join(', ')}; known: ${AUX_STATISTIC_IDS.join(', ')}.`,
          });
        }
        if (new Set(ids).size !== ids.length) ctx.addIssue({ code: 'custom', message: 'A statistic is listed twice.' });
      })
      .default([...AUX_STATISTIC_IDS]),
    /** Largest degree k of the degree distributions and largest distance of the distances; defaults min(n-1, 10) and min(n-1, 6). */
    maxima: z
      .object({
        degree: z.number().int().min(0).max(MAX_DEGREE_LIMIT).optional(),
        distance: z.number().int().min(1).max(MAX_DEGREE_LIMIT).optional(),
      })
      .optional(),
  })
  .superRefine((body, ctx) => {
    if ((body.fitId === undefined) === (body.model === undefined)) {
      ctx.addIssue({ code: 'custom', path: ['fitId'], message: 'Give either a fitId (simulate a fit) or a model (hand-entered values), not both.' });
    }
  });
export type CreateBatchBody = z.input<typeof createBatchBodySchema>;
export type ParsedCreateBatchBody = z.output<typeof createBatchBodySchema>;

// ---------- responses ----------
export interface BatchModelEffect {
  id: EffectId;
  covariate?: string;
  label: string;
  value: number;
}
/** The parameters a batch simulates (copied when the batch is made, so it stays reproducible). */
export interface BatchModel {
  source: 'fit' | 'hand-entered';
  fitId: number | null;
  /** One rate per period of the study (period 1 first); null for a period a fit does not cover. */
  rates: (number | null)[];
  effects: BatchModelEffect[];
}

export interface StatisticLayout {
  statistic: AuxStatisticId;
  label: string;
  /** Component labels, e.g. "<=3" or "021D". */
  components: string[];
}

export interface BatchSummary {
  id: number;
  studyId: number;
  label: string;
  state: BatchState;
  source: 'fit' | 'hand-entered';
  fitId: number | null;
  periods: number[];
  chains: number;
  seed: number;
  statistics: AuxStatisticId[];
  maxima: { degree: number; distance: number };
  /** Chains finished (summed over periods, so chainsTotal = chains x periods). */
  chainsDone: number;
  chainsTotal: number;
  /** Seconds left from the pace so far; null while estimating or when not running. */
  secondsLeft: number | null;
  error: string | null;
  createdBy: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

export interface BatchDetail extends BatchSummary {
  model: BatchModel;
  layout: StatisticLayout[];
  actors: number;
  /** The job's log (plain text, newest last). */
  log: string;
}

export interface EnvelopeBandDto {
  coverage: number;
  lower: number[];
  upper: number[];
  /** Component labels where the observed value falls outside this band. */
  outside: string[];
}

export interface MahalanobisDto {
  /** The observed vector's Mahalanobis distance, mean and covariance from all N + 1 vectors (the headline test). */
  distance: number;
  /**
   * The headline p-value (1 + #{d_s >= d_obs}) / (N + 1) (North, Curtis & Sham 2002), with mean and covariance
   * from the simulated and the observed vectors together, which treats the observed network exactly like a
   * simulated one, so the p-value is uniform when the model is right (see tests/gof/calibration.test.ts).
   */
  pValue: number;
  /**
   * The same with mean and covariance from the simulated vectors alone (METHODS.md 5; Lospinoso & Snijders
   * 2019). Shown beside pValue: it rejects too often when some components are rare.
   */
  pValueSimulatedOnly: number;
  chains: number;
  /** Effective dimension: eigenvalues kept in the pseudo-inverse. */
  componentsKept: number;
  /** Components equal in every simulation (left out of the distance). */
  constantComponents: string[];
  /** Constant components where the observed value differs: the observed network has something no simulation had. */
  outOfSupport: { component: string; observed: number; simulated: number }[];
}

export interface GofResponse {
  batchId: number;
  statistic: AuxStatisticId;
  label: string;
  period: number;
  components: string[];
  observed: number[];
  mean: number[];
  median: number[];
  min: number[];
  max: number[];
  bands: EnvelopeBandDto[];
  test: MahalanobisDto;
  /** The p-value in plain words. */
  reading: string;
  /** Why the p-value needs care (few chains, or a statistic the model fits), else null. */
  caution: string | null;
}

export interface GofSummaryRow {
  statistic: AuxStatisticId;
  label: string;
  pValue: number;
  pValueSimulatedOnly: number;
  distance: number;
  componentsKept: number;
  outOfSupport: number;
  /** Components outside the widest band. */
  outsideWide: string[];
  reading: string;
  caution: string | null;
}
export interface GofSummaryResponse {
  batchId: number;
  period: number;
  chains: number;
  coverages: number[];
  rows: GofSummaryRow[];
}

export interface NetworkComparisonDto {
  pairs: number;
  matched: number;
  missed: number;
  extra: number;
  jaccard: number | null;
  precision: number | null;
  recall: number | null;
}

export interface ConsensusResponse {
  batchId: number;
  period: number;
  /** 'threshold': ties with frequency >= threshold; 'top': the L most frequent pairs. */
  mode: 'threshold' | 'top';
  threshold: number | null;
  /** Number of pairs kept in 'top' mode (the rounded mean simulated tie count). */
  top: number | null;
  actors: string[];
  /** Kept ties as [sender, receiver, frequency] (positions in `actors`). */
  ties: Array<[number, number, number]>;
  comparison: NetworkComparisonDto;
  /** Jaccard index between the observed start and end waves (the persistence baseline). */
  persistence: number | null;
  meanSimulatedTies: number;
  observedTies: number;
  chains: number;
}

/** The part of a batch's parameters that decides which statistics the model fits (for cautions). */
export function fittedStatisticCaution(statistic: AuxStatisticId, effectIds: ReadonlyArray<EffectId>): string | null {
  const has = (id: EffectId) => effectIds.includes(id);
  switch (statistic) {
    case 'dyad_census':
      if (has('density') && has('reciprocity')) {
        return 'The model fits the number of ties (density) and of mutual pairs (reciprocity), so the dyad census is matched by construction: read it only as a check that the estimation converged.';
      }
      if (has('density')) return 'The model fits the number of ties (density), so the dyad census is partly matched by construction.';
      return null;
    case 'outdegree_distribution':
      return has('outdegree_activity') ? 'Outdegree activity fits the sum of squared outdegrees, so the spread of this distribution is partly matched by construction.' : null;
    case 'indegree_distribution':
      return has('indegree_popularity') ? 'Indegree popularity fits the sum of squared indegrees, so the spread of this distribution is partly matched by construction.' : null;
    case 'triad_census': {
      const fitted = [has('transitive_triplets') ? 'transitive triplets' : null, has('three_cycles') ? 'three-cycles' : null].filter(Boolean);
      if (fitted.length === 0) return null;
      const what = fitted.join(' and ');
      return `The model fits the number of ${what}, ${fitted.length > 1 ? 'which are weighted sums' : 'a weighted sum'} of triad counts, so the triad census is partly matched by construction.`;
    }
    default:
      return null;
  }
}
