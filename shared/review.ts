/**
 * The review board: the API contract (zod schemas of request bodies, response types) for verdicts,
 * their history, comment threads, review requests, the inbox, notification preferences, the model
 * comparison and the fit report (sign-off and exports).
 *
 * One Verdict per card: a card is one auxiliary statistic in one period of one batch. Reviewers
 * (ability `review`) record pass / fail / unsure with an optional note. Every change is kept in the
 * verdict history (who, when, old and new). Edits use optimistic concurrency: the client sends the
 * version it last saw (0 when the card has no verdict yet); a stale version is refused with
 * 409 verdict_conflict and the current verdict in details (VerdictConflictDetails), nothing stored.
 *
 * Endpoints (under /api, auth as in shared/api.ts):
 *   GET  /studies/:studyId/batches/:batchId/board                          -> BoardResponse           (members)
 *   GET  /studies/:studyId/batches/:batchId/board/chart?statistic=&period= -> EnvelopeChartDto        (members; batch done)
 *   GET  /studies/:studyId/batches/:batchId/consensus/layout?period=      -> ConsensusLayoutDto      (members; node positions, once per batch)
 *   POST /studies/:studyId/batches/:batchId/verdicts       VerdictBody     -> { verdict: VerdictDto } (review; 201 when new)
 *   GET  /studies/:studyId/batches/:batchId/verdicts/history?statistic=&period=
 *                                                                          -> { history: VerdictChange[] } (members)
 *   GET  /studies/:studyId/batches/:batchId/comments?statistic=&period=    -> { comments: CommentDto[] }   (members)
 *   POST /studies/:studyId/batches/:batchId/comments       CommentBody     -> { comment: CommentDto } 201  (review)
 *   GET  /studies/:studyId/batches/:batchId/review-requests                -> { requests: ReviewRequestDto[] } (members)
 *   POST /studies/:studyId/batches/:batchId/review-requests ReviewRequestBody
 *                                                                          -> { requests: ReviewRequestDto[] } 201 (lead: manageTeam; e-mail sent)
 *   POST /studies/:studyId/review-requests/:requestId/complete             -> { request: ReviewRequestDto } (the asked member or a lead)
 *   GET  /me/inbox                                                         -> InboxResponse           (signed in)
 *   GET  /me/notifications                                                 -> { preferences: NotificationPreferences }
 *   PATCH /me/notifications                NotificationPreferencesBody     -> { preferences: NotificationPreferences }
 *   GET  /studies/:studyId/compare?batches=1,2&fits=3                      -> CompareResponse (members; 2 to 4 items)
 *   GET  /studies/:studyId/batches/:batchId/report?compare=2,3             -> ReportStatus    (members)
 *   POST /studies/:studyId/batches/:batchId/report/signoff  SignoffBody    -> { signoff: SignoffDto } 201 (lead: signReport)
 *   GET  /studies/:studyId/batches/:batchId/report.pdf?compare=2,3         -> application/pdf (members)
 *   GET  /studies/:studyId/batches/:batchId/report.csv?table=gof|estimates -> text/csv        (members)
 *   GET  /studies/:studyId/batches/:batchId/report.json?compare=2,3        -> ReportJson      (members)
 *
 * Error codes added here: verdict_conflict 409 (details: VerdictConflictDetails), acknowledgement_required
 * 400 (a sign-off of a report with concerns without a reason; details: { concerns }), batch_not_ready 409
 * (the batch has not finished), validation_failed 400 for bodies, not_found 404 for a batch, request
 * or statistic that is not in this study.
 */
import { z } from 'zod';
import type { LineupResult } from './lineups';
import type { RefitResults } from './refits';
import { AUX_STATISTIC_IDS, type AuxStatisticId } from './auxStatistics';
import { PLAIN_TEXT_MESSAGE, isPlainText } from './plainText';

export * from './reviewChart';

export const VERDICTS = ['pass', 'fail', 'unsure'] as const;

export type Verdict = (typeof VERDICTS)[number];

export const MAX_NOTE = 2000;

export const MAX_COMMENT = 4000;

export const MAX_COMPARE = 4;

export const MIN_COMPARE = 2;

/** The plain words of each verdict, shown with its icon (never colour alone). */
export const VERDICT_WORDS: Record<Verdict, string> = {
  pass: 'Pass',
  fail: 'Fail',
  unsure: 'Unsure',
};

// ---------- request bodies ----------
const statisticSchema = z.enum(AUX_STATISTIC_IDS, { error: `The statistic must be one of: ${AUX_STATISTIC_IDS.join(', ')}.` });

const periodSchema = z
  .number({ error: 'The period is a whole number (period m runs from wave m to wave m + 1).' })
  .int('The period is a whole number (period m runs from wave m to wave m + 1).')
  .min(1, 'Periods are numbered from 1.');

export const verdictBodySchema = z.object({
  statistic: statisticSchema,
  period: periodSchema,
  verdict: z.enum(VERDICTS, { error: 'The verdict must be "pass", "fail" or "unsure".' }),
  note: z.string({ error: 'The note must be text.' }).trim().max(MAX_NOTE, `A note may have at most ${MAX_NOTE} characters.`).refine(isPlainText, `A note ${PLAIN_TEXT_MESSAGE}.`).default(''),
  /** The version the client last saw: 0 when the card had no verdict yet. */
  version: z
    .number({ error: 'Send the version of the verdict you last saw (0 when there was none).' })
    .int('The version is a whole number.')
    .min(0, 'The version is 0 or more.'),
});

export type VerdictBody = z.input<typeof verdictBodySchema>;

export type ParsedVerdictBody = z.output<typeof verdictBodySchema>;

export const commentBodySchema = z.object({
  statistic: statisticSchema,
  period: periodSchema,
  body: z
    .string({ error: 'The comment must be text.' })
    .trim()
    .min(1, 'Write a comment first.')
    .max(MAX_COMMENT, `A comment may have at most ${MAX_COMMENT} characters.`),
});

export type CommentBody = z.input<typeof commentBodySchema>;

export const reviewRequestBodySchema = z.object({
  userIds: z
    .array(z.number({ error: 'A user id is a whole number.' }).int().positive(), { error: 'Name the team members to ask (their user ids).' })
    .min(1, 'Choose at least one team member to ask.')
    .max(50, 'At most 50 people can be asked at once.'),
  message: z.string({ error: 'The message must be text.' }).trim().max(1000, 'The message may have at most 1000 characters.').default(''),
});

export type ReviewRequestBody = z.input<typeof reviewRequestBodySchema>;

export const notificationPreferencesBodySchema = z
  .strictObject(
    {
      batchEnded: z.boolean({ error: 'Say true or false.' }).optional(),
      reviewRequested: z.boolean({ error: 'Say true or false.' }).optional(),
      reportSigned: z.boolean({ error: 'Say true or false.' }).optional(),
    },
    { error: (issue) => (issue.code === 'unrecognized_keys' ? 'Unknown preference; the preferences are batchEnded, reviewRequested and reportSigned.' : undefined) },
  )
  .refine((b) => Object.keys(b).length > 0, 'Send at least one preference to change.');

export type NotificationPreferencesBody = z.input<typeof notificationPreferencesBodySchema>;

/** The shortest reason accepted when a lead signs off despite a concern (a few words, not "ok"). */
export const MIN_ACK_REASON = 10;

export const signoffBodySchema = z.object({
  note: z.string({ error: 'The note must be text.' }).trim().max(MAX_NOTE, `A note may have at most ${MAX_NOTE} characters.`).refine(isPlainText, `A note ${PLAIN_TEXT_MESSAGE}.`).default(''),
  /**
   * Needed when the report has concerns (ReportStatus.concerns: the fit did not converge, or the
   * batch ran fewer chains than FEW_CHAINS): the lead's reason for signing off anyway. It goes into
   * the report. Ignored when there is no concern.
   */
  acknowledgement: z
    .object(
      {
        reason: z
          .string({ error: 'The reason must be text.' })
          .trim()
          .min(MIN_ACK_REASON, `Give a reason of at least ${MIN_ACK_REASON} characters for signing off despite the concerns.`)
          .max(MAX_NOTE, `A reason may have at most ${MAX_NOTE} characters.`)
          .refine(isPlainText, `A reason ${PLAIN_TEXT_MESSAGE}.`),
      },
      { error: 'The acknowledgement is an object with a reason.' },
    )
    .optional(),
});

export type SignoffBody = z.input<typeof signoffBodySchema>;

// ---------- responses ----------
export interface PersonRef {
  id: number | null;
  name: string;
}

export interface VerdictDto {
  statistic: AuxStatisticId;
  period: number;
  verdict: Verdict;
  note: string;
  /** 1 after the first verdict, +1 on every change. */
  version: number;
  updatedBy: PersonRef | null;
  updatedAt: string;
}

/** details of a 409 verdict_conflict: the verdict as it is stored now. */
export interface VerdictConflictDetails {
  current: VerdictDto | null;
  /** The version the client sent. */
  sentVersion: number;
}

export interface VerdictChange {
  version: number;
  by: PersonRef | null;
  at: string;
  previousVerdict: Verdict | null;
  verdict: Verdict;
  previousNote: string | null;
  note: string;
}

export interface CommentDto {
  id: number;
  statistic: AuxStatisticId;
  period: number;
  author: PersonRef | null;
  body: string;
  createdAt: string;
}

export interface VerdictCounts {
  pass: number;
  fail: number;
  unsure: number;
  /** Cards with no verdict yet. */
  awaiting: number;
  total: number;
}

export interface BoardCard {
  statistic: AuxStatisticId;
  label: string;
  period: number;
  verdict: VerdictDto | null;
  comments: number;
}

export interface ReviewRequestDto {
  id: number;
  studyId: number;
  batchId: number;
  reviewer: PersonRef;
  requestedBy: PersonRef | null;
  message: string;
  createdAt: string;
  /** When the reviewer marked the review done; null while open. */
  completedAt: string | null;
}

/** A concern that a sign-off must acknowledge: a code and the plain sentence shown and printed. */
export interface SignoffConcern {
  code: 'not_converged' | 'few_chains';
  message: string;
}

export interface SignoffAcknowledgement {
  /** The concerns the lead acknowledged, as they were worded at signing. */
  concerns: SignoffConcern[];
  reason: string;
}

export interface SignoffDto {
  id: number;
  batchId: number;
  signedBy: PersonRef | null;
  signedAt: string;
  note: string;
  /** Verdict counts when it was signed. */
  counts: VerdictCounts;
  /** Set when the lead signed off despite concerns (non-converged fit, few chains), with the reason given. */
  acknowledgement: SignoffAcknowledgement | null;
}

export interface BoardResponse {
  studyId: number;
  batchId: number;
  batchLabel: string;
  periods: number[];
  /** One card per statistic and period, in the batch's statistic order, period by period. */
  cards: BoardCard[];
  counts: VerdictCounts;
  requests: ReviewRequestDto[];
  /** The newest sign-off of this batch's report, if any. */
  signoff: SignoffDto | null;
}

export interface InboxItem {
  request: ReviewRequestDto;
  studyName: string;
  batchLabel: string;
  /** Cards of the batch with a verdict (by anyone) and in total. */
  reviewed: number;
  total: number;
}

export interface InboxResponse {
  items: InboxItem[];
}

export interface NotificationPreferences {
  /** A batch of a study I belong to finished or failed. */
  batchEnded: boolean;
  /** A lead asked me to review a batch. */
  reviewRequested: boolean;
  /** A lead signed off a fit report of a study I belong to. */
  reportSigned: boolean;
}

export const DEFAULT_PREFERENCES: NotificationPreferences = { batchEnded: true, reviewRequested: true, reportSigned: true };

// ---------- consensus view ----------
/** Node positions (in [0, 1]^2, seeded, fixed per batch and period), the observed end-wave ties and the actors' covariates. */
export interface ConsensusLayoutDto {
  batchId: number;
  period: number;
  actors: string[];
  positions: Array<[number, number]>;
  /** Observed ties at the end of the period (pairs observed in the end wave only), as [sender, receiver]. */
  observedTies: Array<[number, number]>;
  /** Each covariate's value per actor at the start of the period (null when missing). */
  covariates: { name: string; kind: 'numeric' | 'categorical'; categories: string[]; values: (number | string | null)[] }[];
}

// ---------- compare ----------
export interface CompareColumn {
  /** "batch:3" or "fit:7". */
  key: string;
  kind: 'batch' | 'fit';
  batchId: number | null;
  fitId: number | null;
  label: string;
  modelName: string | null;
  chains: number | null;
  /** Fit convergence (null for hand-entered values). */
  converged: boolean | null;
  maxAbsT: number | null;
  tauMax: number | null;
}

/** Significance of an estimate by its t-statistic (estimate / SE) against the normal quantiles: "p1" |t| >= 2.576, "p5" |t| >= 1.960, "none" below. */
export type Significance = 'p1' | 'p5' | 'none';

export interface CompareEstimateCell {
  value: number;
  se: number | null;
  /** The convergence t-ratio of the fit (how well the fit converged; not a test of the parameter). */
  convergenceT: number | null;
  /** t-statistic estimate / SE (null without an SE, and for rate parameters, which are not tested against 0). */
  t: number | null;
  significance: Significance | null;
}

export interface CompareEstimateRow {
  key: string;
  label: string;
  kind: 'rate' | 'objective';
  cells: (CompareEstimateCell | null)[];
}

export interface ComparePCell {
  pValue: number;
  /** Monte Carlo standard error of the p-value, sqrt(p(1 - p) / N) for N chains. */
  mcSe: number;
  /** The Mahalanobis distance of the observed statistic. */
  distance: number;
  verdict: Verdict | null;
}

export interface ComparePRow {
  statistic: AuxStatisticId;
  label: string;
  period: number;
  cells: (ComparePCell | null)[];
  /** Column whose p-value exceeds every other by more than the rule's margin (null otherwise). */
  better: number | null;
  /** "beyond": one column's p-value is higher beyond Monte Carlo error; "within": the differences are within it; null: fewer than two p-values. */
  difference: 'beyond' | 'within' | null;
}

/** Per column: statistics failing at 0.05, how many were tested, and the summed Mahalanobis distance. */
export interface CompareOverall {
  failing: number;
  tested: number;
  distanceSum: number | null;
}

export interface CompareResponse {
  studyId: number;
  columns: CompareColumn[];
  estimates: CompareEstimateRow[];
  pValues: ComparePRow[];
  /** Verdict counts per column (null for a fit without a batch). */
  verdicts: (VerdictCounts | null)[];
  /** Per column (null for a fit without a batch). */
  overall: (CompareOverall | null)[];
  /** The rule for marking a p-value "better", in words. */
  betterRule: string;
  notes: string[];
}

/** Two-sided normal quantiles for 5% and 1% (Phi^-1(0.975), Phi^-1(0.995)). */
export const Z_5 = 1.959964;
export const Z_1 = 2.575829;
/** A p-value is marked better only when it exceeds each other by more than this many combined Monte Carlo SEs. */
export const BETTER_MC_SE_FACTOR = 2;
export const FAIL_LEVEL = 0.05;

export const SIGNIFICANCE_WORDS: Record<Significance, string> = {
  p1: 'significant at 1%',
  p5: 'significant at 5%',
  none: 'not significant at 5%',
};

export function significanceOf(t: number | null): Significance | null {
  if (t === null || !Number.isFinite(t)) return null;
  const a = Math.abs(t);
  return a >= Z_1 ? 'p1' : a >= Z_5 ? 'p5' : 'none';
}

/**
 * Monte Carlo standard error of a p-value estimated from N chains: sqrt(p(1 - p) / N), with p kept
 * within [1/(N + 1), N/(N + 1)] so that a p-value at the edge (0 or 1 of N) does not claim to have no
 * error at all.
 */
export function monteCarloSe(p: number, chains: number): number {
  if (!(chains > 0) || !Number.isFinite(p)) return NaN;
  const edge = 1 / (chains + 1);
  const q = Math.min(1 - edge, Math.max(edge, p));
  return Math.sqrt((q * (1 - q)) / chains);
}

/**
 * The column whose p-value is higher than every other present one by more than
 * BETTER_MC_SE_FACTOR x sqrt(se_i^2 + se_j^2), and whether the row's differences are beyond or within
 * Monte Carlo error.
 */
export function betterPValue(cells: ReadonlyArray<{ pValue: number; mcSe: number } | null>): { better: number | null; difference: 'beyond' | 'within' | null } {
  const present = cells.map((c, i) => [c, i] as const).filter((e): e is readonly [{ pValue: number; mcSe: number }, number] => e[0] !== null && Number.isFinite(e[0].pValue));
  if (present.length < 2) return { better: null, difference: null };
  const top = present.reduce((a, b) => (b[0].pValue > a[0].pValue ? b : a));
  const clear = present.every(([c, i]) => i === top[1] || top[0].pValue - c.pValue > BETTER_MC_SE_FACTOR * Math.sqrt(top[0].mcSe ** 2 + c.mcSe ** 2));
  return clear ? { better: top[1], difference: 'beyond' } : { better: null, difference: 'within' };
}

// ---------- report ----------
export interface ReportStatus {
  batchId: number;
  batchLabel: string;
  state: string;
  counts: VerdictCounts;
  signoffs: SignoffDto[];
  /** True when a verdict or comment changed after the newest sign-off. */
  changedSinceSignoff: boolean;
  canSign: boolean;
  /** What a sign-off must acknowledge with a reason (empty: it signs off as is). */
  concerns: SignoffConcern[];
}

export interface ReportStatisticJson {
  statistic: AuxStatisticId;
  label: string;
  period: number;
  components: string[];
  observed: number[];
  mean: number[];
  sd: number[];
  bands: { coverage: number; lower: number[]; upper: number[] }[];
  pValue: number;
  pValueSimulatedOnly: number;
  distance: number;
  chains: number;
  reading: string;
  caution: string | null;
  verdict: VerdictDto | null;
  comments: CommentDto[];
  /** Lineup tests of this card (no answers: only how many found the observed wave). */
  lineups: { id: number; panels: number; seed: number; createdBy: string | null; result: LineupResult }[];
}

/**
 * A statistic over all periods together: each chain's statistics summed over the periods, the observed
 * end waves' too, then the same envelopes and test. No verdicts (those stay per period).
 */
export type ReportAllPeriodsJson = Omit<ReportStatisticJson, 'period' | 'verdict' | 'comments' | 'lineups'>;

export interface ReportJson {
  generatedAt: string;
  study: { id: number; name: string; description: string; actors: number; waves: string[] };
  batch: { id: number; label: string; seed: number; chains: number; periods: number[]; source: string; fitId: number | null; createdBy: string | null; finishedAt: string | null };
  model: {
    name: string | null;
    effects: { key: string; label: string; value: number; se: number | null; convergenceT: number | null }[];
    rates: (number | null)[];
    rateDetails: { period: number; value: number | null; se: number | null }[];
    fitSeed: number | null;
    converged: boolean | null;
    maxAbsT: number | null;
    tauMax: number | null;
  };
  statistics: ReportStatisticJson[];
  /** All periods together; null when the batch has one period or lacks one of the study's periods. */
  allPeriods: ReportAllPeriodsJson[] | null;
  counts: VerdictCounts;
  comparison: CompareResponse | null;
  /** A re-fit study the lead chose to include (shared/refits.ts), or null. */
  refitStudy: RefitResults | null;
  signoffs: SignoffDto[];
  changedSinceSignoff: boolean;
  software: { wavefit: string; node: string; packages: Record<string, string> };
}

/**
 * The concerns a sign-off must acknowledge: a fit that did not converge (its convergence check
 * failed; hand-entered values have none), and a batch with fewer chains than FEW_CHAINS (the
 * p-values' Monte Carlo resolution is coarse).
 */
export function signoffConcerns(input: { converged: boolean | null; maxAbsT: number | null; tauMax: number | null; chains: number; fewChains: number }): SignoffConcern[] {
  const out: SignoffConcern[] = [];
  if (input.converged === false) {
    const figures = [input.maxAbsT !== null ? `largest |t| ${input.maxAbsT.toFixed(3)}` : null, input.tauMax !== null ? `overall ratio ${input.tauMax.toFixed(3)}` : null].filter(Boolean).join(', ');
    out.push({ code: 'not_converged', message: `The fit did not converge${figures ? ` (${figures})` : ''}; its estimates may not be the method-of-moments solution.` });
  }
  if (input.chains < input.fewChains) {
    out.push({ code: 'few_chains', message: `The batch ran ${input.chains} chains, fewer than ${input.fewChains}; its p-values are coarse (the smallest possible is 1/${input.chains + 1}).` });
  }
  return out;
}

/** Counts of verdicts over a list of cards. */
export function countVerdicts(verdicts: ReadonlyArray<Verdict | null>): VerdictCounts {
  const counts: VerdictCounts = { pass: 0, fail: 0, unsure: 0, awaiting: 0, total: verdicts.length };
  for (const v of verdicts) {
    if (v === null) counts.awaiting++;
    else counts[v]++;
  }
  return counts;
}

/** Parses "1,2,3" (a query parameter) into distinct positive ids; throws with a plain message. */
export function parseIdList(raw: unknown, what: string): number[] {
  if (raw === undefined || raw === '') return [];
  const text = Array.isArray(raw) ? raw.join(',') : String(raw);
  const parts = text.split(',').map((s) => s.trim()).filter((s) => s.length > 0);
  const ids: number[] = [];
  for (const p of parts) {
    if (!/^[1-9][0-9]{0,15}$/.test(p)) throw new Error(`${what} are listed as whole numbers separated by commas (e.g. 3,5); "${p}" is not one.`);
    const id = Number(p);
    if (!ids.includes(id)) ids.push(id);
  }
  return ids;
}
