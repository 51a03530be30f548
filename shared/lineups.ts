/**
 * The lineup test's API contract (server/lineups, features/lineups).
 *
 *   GET  /studies/:studyId/batches/:batchId/lineups                      -> { lineups: LineupSummary[] }
 *   POST /studies/:studyId/batches/:batchId/lineups   CreateLineupBody   -> 201 { lineup: LineupSummary }
 *   GET  /studies/:studyId/lineups/:lineupId                             -> LineupDetail
 *   POST /studies/:studyId/lineups/:lineupId/picks    PickBody           -> 201 LineupDetail (with the answer)
 *   POST /studies/:studyId/lineups/:lineupId/invitations  LineupInviteBody -> 201 { invited: number[] }
 *
 * Before a person has picked, nothing they can read tells which panel is the observed wave: the panels
 * carry only their number and values, other people's picks are hidden, and the answer field is null.
 */
import { z } from 'zod';
import { AUX_STATISTIC_IDS, type AuxStatisticId } from './auxStatistics';

export const MIN_LINEUP_PANELS = 5;
export const MAX_LINEUP_PANELS = 40;
export const LINEUP_PANELS_DEFAULT = 20;
export const MAX_PICK_REASON = 500;

export const createLineupBodySchema = z.object({
  statistic: z.enum(AUX_STATISTIC_IDS, { error: `The statistic must be one of: ${AUX_STATISTIC_IDS.join(', ')}.` }),
  period: z.number({ error: 'The period is a whole number from 1.' }).int('The period is a whole number from 1.').min(1, 'Periods are numbered from 1.'),
  panels: z
    .number({ error: 'The number of panels is a whole number.' })
    .int('The number of panels is a whole number.')
    .min(MIN_LINEUP_PANELS, `A lineup has at least ${MIN_LINEUP_PANELS} panels.`)
    .max(MAX_LINEUP_PANELS, `A lineup has at most ${MAX_LINEUP_PANELS} panels.`)
    .default(LINEUP_PANELS_DEFAULT),
  seed: z.number({ error: 'The seed is a whole number.' }).int('The seed is a whole number.').min(0).max(2 ** 31 - 1).optional(),
});
export type CreateLineupBody = z.input<typeof createLineupBodySchema>;

export const pickBodySchema = z.object({
  panel: z.number({ error: 'Say which panel you picked (its number).' }).int('A panel number is a whole number.').min(1, 'Panels are numbered from 1.'),
  reason: z
    .string({ error: 'Say in a few words why that panel looks different.' })
    .trim()
    .min(3, 'Say in a few words why that panel looks different.')
    .max(MAX_PICK_REASON, `At most ${MAX_PICK_REASON} characters.`),
});
export type PickBody = z.input<typeof pickBodySchema>;

export const lineupInviteBodySchema = z.object({
  userIds: z
    .array(z.number({ error: 'A user id is a whole number.' }).int().positive(), { error: 'Name the team members to invite (their user ids).' })
    .min(1, 'Choose at least one team member to invite.')
    .max(50, 'At most 50 people can be invited at once.'),
  message: z.string({ error: 'The message must be text.' }).trim().max(1000, 'The message may have at most 1000 characters.').default(''),
});
export type LineupInviteBody = z.input<typeof lineupInviteBodySchema>;

export interface LineupResult {
  /** Independent reviewers who picked (K). */
  reviewers: number;
  /** Of them, how many picked the observed panel (x). */
  correct: number;
  /** P(Binomial(K, 1/m) >= x); null before anyone picked. */
  pValue: number | null;
  /** The smallest p-value K reviewers could reach, (1/m)^K. */
  floor: number | null;
  /** The result in plain words. */
  reading: string;
  /** Few reviewers, or none yet. */
  caution: string | null;
}

export interface LineupPickDto {
  panel: number;
  correct: boolean;
  reason: string;
  reviewer: { id: number | null; name: string };
  pickedAt: string;
}

export interface LineupSummary {
  id: number;
  studyId: number;
  batchId: number;
  statistic: AuxStatisticId;
  label: string;
  period: number;
  panels: number;
  seed: number;
  createdBy: string | null;
  createdAt: string;
  result: LineupResult;
  /** Whether the signed-in person has picked (and so has seen the answer). */
  picked: boolean;
}

export interface LineupAnswer {
  /** The observed wave's panel, from 1. */
  observedPanel: number;
  mine: LineupPickDto;
  /** Everyone's picks, oldest first. */
  picks: LineupPickDto[];
}

export interface LineupDetail extends LineupSummary {
  batchLabel: string;
  components: string[];
  /** 'counts' as they are, or 'standardised' by the simulated mean and sd of each component (the same for every panel). */
  scale: 'counts' | 'standardised';
  /** One vector per panel, panel 1 first; all drawn on the same axes [yMin, yMax]. */
  panelValues: number[][];
  yMin: number;
  yMax: number;
  /** Null until the signed-in person has picked. */
  answer: LineupAnswer | null;
}

export function lineupReading(r: { reviewers: number; correct: number; pValue: number | null }, panels: number): string {
  if (r.reviewers === 0) return 'Nobody has taken this lineup yet.';
  const p = r.pValue!;
  const pText = p < 0.001 ? p.toExponential(1) : p.toFixed(3);
  const base = `${r.correct} of ${r.reviewers} reviewer${r.reviewers === 1 ? '' : 's'} picked the observed wave out of ${panels} panels (p = ${pText}).`;
  if (p < 0.05) return `${base} People can tell the observed wave from the simulated ones: the model misses something visible in this statistic.`;
  return `${base} The observed wave did not stand out from the simulated ones.`;
}

export function lineupCaution(reviewers: number, panels: number, few: number): string | null {
  if (reviewers === 0) return null;
  const floor = Math.pow(1 / panels, reviewers);
  if (reviewers < few) {
    return `Only ${reviewers} reviewer${reviewers === 1 ? '' : 's'} so far: a single correct pick already gives p = ${(1 - Math.pow(1 - 1 / panels, reviewers)).toFixed(3)}, and one lucky guess moves the p-value a lot. The test assumes each reviewer picked without seeing the envelope chart or anyone else's pick; ask more people (five or more) before reading much into it.`;
  }
  return floor > 0.05 ? `Even if all ${reviewers} pick the observed wave, p cannot fall below ${floor.toFixed(3)}.` : null;
}
