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
 * Error codes added here: verdict_conflict 409 (details: VerdictConflictDetails), batch_not_ready 409
 * (the batch has not finished), validation_failed 400 for bodies, not_found 404 for a batch, request
 * or statistic that is not in this study.
 */
import { z } from 'zod';
import type { RefitResults } from './refits';
import { AUX_STATISTIC_IDS, type AuxStatisticId } from './auxStatistics';

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
  note: z.string({ error: 'The note must be text.' }).trim().max(MAX_NOTE, `A note may have at most ${MAX_NOTE} characters.`).default(''),
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

export const signoffBodySchema = z.object({
  note: z.string({ error: 'The note must be text.' }).trim().max(MAX_NOTE, `A note may have at most ${MAX_NOTE} characters.`).default(''),
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

export interface SignoffDto {
  id: number;
  batchId: number;
  signedBy: PersonRef | null;
  signedAt: string;
  note: string;
  /** Verdict counts when it was signed. */
  counts: VerdictCounts;
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

export interface CompareEstimateCell {
  value: number;
  se: number | null;
  convergenceT: number | null;
}

export interface CompareEstimateRow {
  key: string;
  label: string;
  kind: 'rate' | 'objective';
  cells: (CompareEstimateCell | null)[];
  /** Column whose convergence t-ratio is smallest in absolute value (null when fewer than two have one, or a tie). */
  better: number | null;
}

export interface ComparePCell {
  pValue: number;
  verdict: Verdict | null;
}

export interface ComparePRow {
  statistic: AuxStatisticId;
  label: string;
  period: number;
  cells: (ComparePCell | null)[];
  /** Column with the highest p-value (null when fewer than two have one, or a tie). */
  better: number | null;
}

export interface CompareResponse {
  studyId: number;
  columns: CompareColumn[];
  estimates: CompareEstimateRow[];
  pValues: ComparePRow[];
  /** Verdict counts per column (null for a fit without a batch). */
  verdicts: (VerdictCounts | null)[];
  notes: string[];
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
}

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
  counts: VerdictCounts;
  comparison: CompareResponse | null;
  /** A re-fit study the lead chose to include (shared/refits.ts), or null. */
  refitStudy: RefitResults | null;
  signoffs: SignoffDto[];
  changedSinceSignoff: boolean;
  software: { wavefit: string; node: string; packages: Record<string, string> };
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

/** Index of the largest (or smallest) value, or null when fewer than two are given or the best is shared. */
export function bestIndex(values: ReadonlyArray<number | null>, prefer: 'higher' | 'lower'): number | null {
  const present = values.map((v, i) => [v, i] as const).filter((e): e is readonly [number, number] => e[0] !== null && Number.isFinite(e[0]));
  if (present.length < 2) return null;
  const sign = prefer === 'higher' ? 1 : -1;
  let best = present[0];
  let shared = false;
  for (const e of present.slice(1)) {
    if (sign * e[0] > sign * best[0]) {
      best = e;
      shared = false;
    } else if (e[0] === best[0]) shared = true;
  }
  return shared ? null : best[1];
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
