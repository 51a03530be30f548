/**
 * The lineup test on the server: making a seeded lineup for a card (a statistic in one period of a
 * finished batch), the panels drawn from the stored statistic vectors, one pick per person, the
 * binomial result, and inviting members. The engine part (the plan and the p-value) is
 * server/engine/gof/lineup.ts; the contract is shared/lineups.ts.
 *
 * The observed panel's number leaves the server only in the answer to someone who has picked: the
 * panels carry their number and values only, and other people's picks are shown after one's own.
 */
import type { DataSource } from 'typeorm';
import {
  lineupCaution,
  lineupReading,
  type CreateLineupBody,
  type LineupDetail,
  type LineupPickDto,
  type LineupResult,
  type LineupSummary,
} from '../../shared/lineups';
import type { AuxStatisticId } from '../../shared/auxStatistics';
import { chartScaleOf } from '../../shared/reviewChart';
import { FEW_REVIEWERS, lineupFloor, lineupPlan, lineupPValue, type LineupPlan } from '../engine/gof/lineup';
import { deriveSeed } from '../engine/prng';
import { periodMatrix } from '../batches/gof';
import { layoutOffsets } from '../batches/layout';
import { getBatch, type LoadedBatch } from '../batches/service';
import { inSyncTransaction, sqlNow, syncDb, type SyncDb } from '../db/sync';
import { ApiError, badRequest, conflict, notFound } from '../errors';
import { recordEvent, wakeAfterCommit, type LineupInvitedPayload } from '../notify/notifier';
import { checkCard, iso, requireDone } from '../review/service';

/** The stream key of lineup seeds under a batch's seed ("L1" in ASCII). */
const LINEUP_STREAM = 0x4c31;

interface LineupDbRow {
  id: number;
  studyId: number;
  batchId: number;
  statistic: string;
  period: number;
  panels: number;
  seed: number;
  plan: string;
  createdById: number | null;
  createdByName: string | null;
  createdAt: string;
}

interface PickDbRow {
  id: number;
  lineupId: number;
  userId: number | null;
  userName: string;
  panel: number;
  correct: number;
  reason: string;
  createdAt: string;
}

export interface LoadedLineup {
  row: LineupDbRow;
  plan: LineupPlan;
  batch: LoadedBatch;
}

const SELECT = `SELECT l.*, u."name" AS "createdByName" FROM "lineups" l LEFT JOIN "users" u ON u."id" = l."createdById"`;

function picksOf(db: SyncDb, lineupId: number): PickDbRow[] {
  return db.prepare(`SELECT * FROM "lineup_picks" WHERE "lineupId" = ? ORDER BY "id"`).all(lineupId) as PickDbRow[];
}

function pickDto(p: PickDbRow): LineupPickDto {
  return { panel: p.panel, correct: p.correct === 1, reason: p.reason, reviewer: { id: p.userId, name: p.userName }, pickedAt: iso(p.createdAt)! };
}

export function resultOf(picks: { correct: boolean | number }[], panels: number): LineupResult {
  const reviewers = picks.length;
  const correct = picks.filter((p) => p.correct === true || p.correct === 1).length;
  const pValue = reviewers ? lineupPValue(reviewers, correct, panels) : null;
  return {
    reviewers,
    correct,
    pValue,
    floor: reviewers ? lineupFloor(reviewers, panels) : null,
    reading: lineupReading({ reviewers, correct, pValue }, panels),
    caution: lineupCaution(reviewers, panels, FEW_REVIEWERS),
  };
}

function labelOf(batch: LoadedBatch, statistic: string): string {
  return batch.layout.find((l) => l.statistic === statistic)?.label ?? statistic;
}

function summaryOf(db: SyncDb, row: LineupDbRow, batch: LoadedBatch, userId: number): LineupSummary {
  const picks = picksOf(db, row.id);
  return {
    id: row.id,
    studyId: row.studyId,
    batchId: row.batchId,
    statistic: row.statistic as AuxStatisticId,
    label: labelOf(batch, row.statistic),
    period: row.period,
    panels: row.panels,
    seed: row.seed,
    createdBy: row.createdByName,
    createdAt: iso(row.createdAt)!,
    result: resultOf(picks.map((p) => ({ correct: p.correct })), row.panels),
    picked: picks.some((p) => p.userId === userId),
  };
}

/** The lineups of a batch, oldest first. */
export function lineupsOf(dataSource: DataSource, batch: LoadedBatch, userId: number): LineupSummary[] {
  const db = syncDb(dataSource);
  const rows = db.prepare(`${SELECT} WHERE l."batchId" = ? ORDER BY l."id"`).all(batch.row.id) as LineupDbRow[];
  return rows.map((r) => summaryOf(db, r, batch, userId));
}

/** The seed a new lineup gets when none is given: the batch's seed, the card and how many lineups the card has. */
export function defaultLineupSeed(batch: LoadedBatch, statistic: string, period: number, ordinal: number): number {
  const index = batch.layout.findIndex((l) => l.statistic === statistic);
  return deriveSeed(batch.row.seed, LINEUP_STREAM, index, period, ordinal) % 2147483647;
}

export async function createLineup(
  dataSource: DataSource,
  batch: LoadedBatch,
  user: { id: number },
  body: { statistic: AuxStatisticId; period: number; panels: number; seed?: number },
): Promise<LineupSummary> {
  requireDone(batch);
  checkCard(batch, body.statistic, body.period);
  const chains = batch.summary.chains;
  if (chains < body.panels - 1) {
    throw badRequest(`A lineup of ${body.panels} panels needs ${body.panels - 1} simulated networks; this batch has ${chains}. Choose fewer panels.`);
  }
  const db = syncDb(dataSource);
  const id = await inSyncTransaction(db, (tx) => {
    const { n } = tx.prepare(`SELECT COUNT(*) AS n FROM "lineups" WHERE "batchId" = ? AND "statistic" = ? AND "period" = ?`).get(batch.row.id, body.statistic, body.period) as { n: number };
    const seed = body.seed ?? defaultLineupSeed(batch, body.statistic, body.period, Number(n) + 1);
    const plan = lineupPlan(seed, body.panels, chains);
    const result = tx
      .prepare(`INSERT INTO "lineups" ("studyId", "batchId", "statistic", "period", "panels", "seed", "plan", "createdById", "createdAt") VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`)
      .run(batch.row.studyId, batch.row.id, body.statistic, body.period, body.panels, seed, JSON.stringify(plan), user.id, sqlNow());
    return Number(result.lastInsertRowid);
  });
  return summaryOf(db, loadRow(db, batch.row.studyId, id)!, batch, user.id);
}

function loadRow(db: SyncDb, studyId: number, lineupId: number): LineupDbRow | undefined {
  return db.prepare(`${SELECT} WHERE l."studyId" = ? AND l."id" = ?`).get(studyId, lineupId) as LineupDbRow | undefined;
}

export function loadLineup(dataSource: DataSource, studyId: number, lineupId: number): LoadedLineup {
  const row = loadRow(syncDb(dataSource), studyId, lineupId);
  if (!row) throw notFound('Lineup not found.');
  const batch = getBatch(dataSource, studyId, row.batchId);
  if (!batch) throw notFound('Lineup not found.');
  return { row, plan: JSON.parse(row.plan) as LineupPlan, batch };
}

/** The panels as the reviewer sees them: the same drawing rule for every panel, the observed one unmarked. */
export function panelsOf(dataSource: DataSource, lineup: LoadedLineup): Pick<LineupDetail, 'components' | 'scale' | 'panelValues' | 'yMin' | 'yMax'> {
  const { batch, row, plan } = lineup;
  const layout = batch.layout.find((l) => l.statistic === row.statistic)!;
  const offset = layoutOffsets(batch.layout).offsets.get(layout.statistic)!;
  const width = layout.components.length;
  const matrix = periodMatrix(dataSource, batch, row.period);
  const observed = batch.observed[String(row.period)]?.[row.statistic];
  if (!observed) throw new Error(`lineups: no observed ${row.statistic} for period ${row.period} in batch ${batch.row.id}`);
  const simulated = (chain: number) => Array.from(matrix.data.subarray(chain * matrix.width + offset, chain * matrix.width + offset + width));
  let panelValues = plan.chainOfPanel.map((c) => (c < 0 ? [...observed] : simulated(c)));
  const scale = chartScaleOf(layout.statistic);
  if (scale === 'standardised') {
    // Standardise every panel by the same per-component mean and sd over all simulated chains.
    const mean = new Array<number>(width).fill(0);
    const sd = new Array<number>(width).fill(0);
    for (let s = 0; s < matrix.chains; s++) for (let k = 0; k < width; k++) mean[k] += matrix.data[s * matrix.width + offset + k] / matrix.chains;
    for (let s = 0; s < matrix.chains; s++) for (let k = 0; k < width; k++) sd[k] += (matrix.data[s * matrix.width + offset + k] - mean[k]) ** 2;
    for (let k = 0; k < width; k++) sd[k] = matrix.chains > 1 ? Math.sqrt(sd[k] / (matrix.chains - 1)) : 0;
    panelValues = panelValues.map((v) => v.map((x, k) => (sd[k] > 0 ? (x - mean[k]) / sd[k] : 0)));
  }
  let yMin = Infinity;
  let yMax = -Infinity;
  for (const v of panelValues) for (const x of v) {
    yMin = Math.min(yMin, x);
    yMax = Math.max(yMax, x);
  }
  if (scale === 'counts') yMin = Math.min(0, yMin);
  if (!(yMax > yMin)) yMax = yMin + 1;
  return { components: [...layout.components], scale, panelValues, yMin, yMax };
}

export function lineupDetail(dataSource: DataSource, lineup: LoadedLineup, userId: number): LineupDetail {
  const db = syncDb(dataSource);
  const picks = picksOf(db, lineup.row.id);
  const mine = picks.find((p) => p.userId === userId);
  return {
    ...summaryOf(db, lineup.row, lineup.batch, userId),
    batchLabel: lineup.batch.row.label,
    ...panelsOf(dataSource, lineup),
    answer: mine ? { observedPanel: lineup.plan.observedPanel + 1, mine: pickDto(mine), picks: picks.map(pickDto) } : null,
  };
}

/** One pick per person: a second is refused (409 already_picked) and nothing changes. */
export async function pickPanel(dataSource: DataSource, lineup: LoadedLineup, user: { id: number; name: string }, body: { panel: number; reason: string }): Promise<LineupDetail> {
  if (body.panel > lineup.row.panels) {
    throw new ApiError(400, 'validation_failed', `This lineup has panels 1 to ${lineup.row.panels}; there is no panel ${body.panel}.`, {
      fields: { panel: [`Choose a panel from 1 to ${lineup.row.panels}.`] },
    });
  }
  const db = syncDb(dataSource);
  const correct = body.panel - 1 === lineup.plan.observedPanel;
  await inSyncTransaction(db, (tx) => {
    const already = tx.prepare(`SELECT 1 FROM "lineup_picks" WHERE "lineupId" = ? AND "userId" = ?`).get(lineup.row.id, user.id);
    if (already) throw conflict('already_picked', 'You have taken this lineup already and seen its answer; a second pick would not be independent.');
    tx.prepare(`INSERT INTO "lineup_picks" ("lineupId", "studyId", "userId", "userName", "panel", "correct", "reason", "createdAt") VALUES (?, ?, ?, ?, ?, ?, ?, ?)`).run(
      lineup.row.id,
      lineup.row.studyId,
      user.id,
      user.name,
      body.panel,
      correct ? 1 : 0,
      body.reason,
      sqlNow(),
    );
  });
  return lineupDetail(dataSource, lineup, user.id);
}

/**
 * Invites members to take a lineup (an e-mail through the notification outbox). Members who have
 * picked already have seen the answer and are not invited again.
 */
export async function inviteToLineup(
  dataSource: DataSource,
  lineup: LoadedLineup,
  lead: { id: number; name: string },
  body: { userIds: number[]; message: string },
): Promise<{ invited: number[]; alreadyPicked: number[] }> {
  const db = syncDb(dataSource);
  const ids = [...new Set(body.userIds)];
  const memberIds = new Set(
    (
      db.prepare(`SELECT "userId" FROM "memberships" WHERE "studyId" = ? AND "userId" IN (${ids.map(() => '?').join(',')})`).all(lineup.row.studyId, ...ids) as {
        userId: number;
      }[]
    ).map((m) => m.userId),
  );
  const strangers = ids.filter((id) => !memberIds.has(id));
  if (strangers.length) {
    throw new ApiError(400, 'validation_failed', `Only members of the study can be invited to a lineup; not member${strangers.length > 1 ? 's' : ''}: ${strangers.join(', ')}.`, {
      fields: Object.fromEntries(body.userIds.map((id, k) => [id, k] as const).filter(([id]) => !memberIds.has(id)).map(([id, k]) => [`userIds.${k}`, [`User ${id} is not a member of this study.`]])),
    });
  }
  const picked = new Set(picksOf(db, lineup.row.id).map((p) => p.userId));
  const invited = ids.filter((id) => !picked.has(id));
  const alreadyPicked = ids.filter((id) => picked.has(id));
  if (invited.length) {
    await inSyncTransaction(db, (tx) => {
      recordEvent(tx, 'lineup_invited', lineup.row.studyId, lineup.row.batchId, {
        lineupId: lineup.row.id,
        reviewerIds: invited,
        invitedBy: lead.name,
        statisticLabel: labelOf(lineup.batch, lineup.row.statistic),
        panels: lineup.row.panels,
        message: body.message,
      } satisfies LineupInvitedPayload);
    });
    wakeAfterCommit(db);
  }
  return { invited, alreadyPicked };
}

export type { CreateLineupBody };
