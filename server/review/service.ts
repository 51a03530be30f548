/**
 * The review board on the server: cards (statistic x period of a finished batch), verdicts with
 * optimistic concurrency and a full history, comment threads, review requests and the inbox, and
 * report sign-offs. Writes go through the synchronous better-sqlite3 handle inside one transaction
 * each (server/db/sync.ts explains why), so a verdict and its history row commit together or not at all.
 */
import type { DataSource } from 'typeorm';
import type { AuxStatisticId } from '../../shared/auxStatistics';
import {
  countVerdicts,
  type BoardCard,
  type BoardResponse,
  type CommentDto,
  type InboxItem,
  type ParsedVerdictBody,
  type PersonRef,
  type ReviewRequestDto,
  type SignoffDto,
  type Verdict,
  type VerdictChange,
  type VerdictCounts,
  type VerdictDto,
} from '../../shared/review';
import { getBatch, type LoadedBatch } from '../batches/service';
import { inSyncTransaction, parseSqlDate, sqlNow, syncDb, type SyncDb } from '../db/sync';
import { ApiError } from '../errors';
import type { VerdictHistoryRow } from './entities';
import { recordEvent, wakeAfterCommit, type ReportSignedPayload, type ReviewRequestedPayload } from '../notify/notifier';

const iso = (value: string | null | undefined): string | null => parseSqlDate(value ?? null)?.toISOString() ?? null;
const person = (id: number | null, name: string | null | undefined): PersonRef | null =>
  id === null && !name ? null : { id, name: name ?? 'A former member' };

// ---------------------------------------------------------------- batches and cards

export function loadReviewBatch(dataSource: DataSource, studyId: number, batchId: number): LoadedBatch {
  const batch = getBatch(dataSource, studyId, batchId);
  if (!batch) throw new ApiError(404, 'not_found', 'Batch not found.');
  return batch;
}

export function requireDone(batch: LoadedBatch): void {
  if (batch.summary.state !== 'done') {
    throw new ApiError(
      409,
      'batch_not_ready',
      `This batch is ${batch.summary.state === 'running' ? 'still running' : batch.summary.state}; statistics are reviewed once it is done.`,
    );
  }
}

export interface CardRef {
  statistic: AuxStatisticId;
  label: string;
  period: number;
}

/** Every card of a batch: each statistic in the batch's order, period by period. */
export function cardsOf(batch: LoadedBatch): CardRef[] {
  const cards: CardRef[] = [];
  for (const period of batch.summary.periods) {
    for (const l of batch.layout) cards.push({ statistic: l.statistic, label: l.label, period });
  }
  return cards;
}

export function checkCard(batch: LoadedBatch, statistic: string, period: number): CardRef {
  const card = cardsOf(batch).find((c) => c.statistic === statistic && c.period === period);
  if (!card) {
    throw new ApiError(
      404,
      'not_found',
      `This batch has no statistic "${statistic}" in period ${period}; it has ${batch.layout.map((l) => l.statistic).join(', ')} in period${
        batch.summary.periods.length > 1 ? 's' : ''
      } ${batch.summary.periods.join(', ')}.`,
    );
  }
  return card;
}

const cardKey = (statistic: string, period: number) => `${statistic}@${period}`;

// ---------------------------------------------------------------- verdicts

interface VerdictDbRow {
  id: number;
  statistic: string;
  period: number;
  verdict: string;
  note: string;
  version: number;
  updatedById: number | null;
  updatedByName: string | null;
  updatedAt: string;
}

const VERDICT_SELECT = `SELECT v."id", v."statistic", v."period", v."verdict", v."note", v."version", v."updatedById", u."name" AS "updatedByName", v."updatedAt"
  FROM "verdicts" v LEFT JOIN "users" u ON u."id" = v."updatedById"`;

function verdictDto(row: VerdictDbRow): VerdictDto {
  return {
    statistic: row.statistic as AuxStatisticId,
    period: row.period,
    verdict: row.verdict as Verdict,
    note: row.note,
    version: row.version,
    updatedBy: person(row.updatedById, row.updatedByName),
    updatedAt: iso(row.updatedAt)!,
  };
}

export function verdictsOf(db: SyncDb, batchId: number): Map<string, VerdictDto> {
  const rows = db.prepare(`${VERDICT_SELECT} WHERE v."batchId" = ?`).all(batchId) as VerdictDbRow[];
  return new Map(rows.map((r) => [cardKey(r.statistic, r.period), verdictDto(r)]));
}

function verdictRow(db: SyncDb, batchId: number, statistic: string, period: number): VerdictDbRow | undefined {
  return db.prepare(`${VERDICT_SELECT} WHERE v."batchId" = ? AND v."statistic" = ? AND v."period" = ?`).get(batchId, statistic, period) as
    | VerdictDbRow
    | undefined;
}

export function verdictCounts(db: SyncDb, batch: LoadedBatch): VerdictCounts {
  const verdicts = verdictsOf(db, batch.row.id);
  return countVerdicts(cardsOf(batch).map((c) => verdicts.get(cardKey(c.statistic, c.period))?.verdict ?? null));
}

/**
 * Records a verdict. `body.version` must be the stored version (0 when the card has none yet);
 * otherwise nothing is stored and a 409 verdict_conflict carries the current verdict. Returns the
 * stored verdict and whether it was the card's first.
 */
export async function saveVerdict(
  dataSource: DataSource,
  batch: LoadedBatch,
  user: { id: number; name: string },
  body: ParsedVerdictBody,
): Promise<{ verdict: VerdictDto; created: boolean }> {
  requireDone(batch);
  checkCard(batch, body.statistic, body.period);
  const db = syncDb(dataSource);
  const batchId = batch.row.id;
  return inSyncTransaction(db, (tx) => {
    const current = verdictRow(tx, batchId, body.statistic, body.period);
    const currentVersion = current?.version ?? 0;
    if (body.version !== currentVersion) {
      const who = current?.updatedByName ? ` by ${current.updatedByName}` : '';
      throw new ApiError(
        409,
        'verdict_conflict',
        current
          ? `Someone changed this verdict while you were editing: it is now "${current.verdict}" (version ${current.version}${who}). Nothing was saved; look at it and save again if you still disagree.`
          : `This card has no verdict yet (you sent version ${body.version}); reload and try again.`,
        { current: current ? verdictDto(current) : null, sentVersion: body.version },
      );
    }
    const now = sqlNow();
    let verdictId: number;
    if (current) {
      if (current.verdict === body.verdict && current.note === body.note) {
        return { verdict: verdictDto(current), created: false };
      }
      const result = tx
        .prepare(`UPDATE "verdicts" SET "verdict" = ?, "note" = ?, "version" = "version" + 1, "updatedById" = ?, "updatedAt" = ? WHERE "id" = ? AND "version" = ?`)
        .run(body.verdict, body.note, user.id, now, current.id, currentVersion);
      if (result.changes !== 1) throw new Error('review: a verdict changed inside its own transaction');
      verdictId = current.id;
    } else {
      const result = tx
        .prepare(
          `INSERT INTO "verdicts" ("studyId", "batchId", "statistic", "period", "verdict", "note", "version", "updatedById", "createdAt", "updatedAt") VALUES (?, ?, ?, ?, ?, ?, 1, ?, ?, ?)`,
        )
        .run(batch.row.studyId, batchId, body.statistic, body.period, body.verdict, body.note, user.id, now, now);
      verdictId = Number(result.lastInsertRowid);
    }
    tx.prepare(
      `INSERT INTO "verdict_history" ("verdictId", "batchId", "statistic", "period", "version", "userId", "userName", "previousVerdict", "verdict", "previousNote", "note", "createdAt")
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    ).run(verdictId, batchId, body.statistic, body.period, currentVersion + 1, user.id, user.name, current?.verdict ?? null, body.verdict, current?.note ?? null, body.note, now);
    return { verdict: verdictDto(verdictRow(tx, batchId, body.statistic, body.period)!), created: !current };
  });
}

export function historyOf(db: SyncDb, batchId: number, statistic: string, period: number): VerdictChange[] {
  const rows = db
    .prepare(
      `SELECT "version", "userId", "userName", "previousVerdict", "verdict", "previousNote", "note", "createdAt" FROM "verdict_history"
       WHERE "batchId" = ? AND "statistic" = ? AND "period" = ? ORDER BY "version" DESC`,
    )
    .all(batchId, statistic, period) as (Omit<VerdictHistoryRow, 'id' | 'verdictId' | 'batchId' | 'statistic' | 'period' | 'createdAt'> & {
    createdAt: string;
  })[];
  return rows.map((r) => ({
    version: r.version,
    by: person(r.userId, r.userName),
    at: iso(r.createdAt)!,
    previousVerdict: r.previousVerdict as Verdict | null,
    verdict: r.verdict as Verdict,
    previousNote: r.previousNote,
    note: r.note,
  }));
}

/** The newest change time of any verdict or comment of a batch (null when there is none). */
export function lastReviewChange(db: SyncDb, batchId: number): Date | null {
  const row = db
    .prepare(
      `SELECT MAX(t) AS t FROM (SELECT MAX("createdAt") AS t FROM "verdict_history" WHERE "batchId" = ? UNION ALL SELECT MAX("createdAt") FROM "review_comments" WHERE "batchId" = ?)`,
    )
    .get(batchId, batchId) as { t: string | null };
  return parseSqlDate(row.t);
}

// ---------------------------------------------------------------- comments

interface CommentDbRow {
  id: number;
  statistic: string;
  period: number;
  authorId: number | null;
  authorName: string;
  body: string;
  createdAt: string;
}

function commentDto(r: CommentDbRow): CommentDto {
  return {
    id: r.id,
    statistic: r.statistic as AuxStatisticId,
    period: r.period,
    author: person(r.authorId, r.authorName),
    body: r.body,
    createdAt: iso(r.createdAt)!,
  };
}

export function commentsOf(db: SyncDb, batchId: number, card?: { statistic: string; period: number }): CommentDto[] {
  const rows = card
    ? db
        .prepare(`SELECT * FROM "review_comments" WHERE "batchId" = ? AND "statistic" = ? AND "period" = ? ORDER BY "id"`)
        .all(batchId, card.statistic, card.period)
    : db.prepare(`SELECT * FROM "review_comments" WHERE "batchId" = ? ORDER BY "id"`).all(batchId);
  return (rows as CommentDbRow[]).map(commentDto);
}

export async function addComment(
  dataSource: DataSource,
  batch: LoadedBatch,
  user: { id: number; name: string },
  card: { statistic: string; period: number; body: string },
): Promise<CommentDto> {
  requireDone(batch);
  checkCard(batch, card.statistic, card.period);
  const db = syncDb(dataSource);
  return inSyncTransaction(db, (tx) => {
    const result = tx
      .prepare(`INSERT INTO "review_comments" ("studyId", "batchId", "statistic", "period", "authorId", "authorName", "body", "createdAt") VALUES (?, ?, ?, ?, ?, ?, ?, ?)`)
      .run(batch.row.studyId, batch.row.id, card.statistic, card.period, user.id, user.name, card.body, sqlNow());
    return commentDto(tx.prepare(`SELECT * FROM "review_comments" WHERE "id" = ?`).get(Number(result.lastInsertRowid)) as CommentDbRow);
  });
}

// ---------------------------------------------------------------- review requests and the inbox

interface RequestDbRow {
  id: number;
  studyId: number;
  batchId: number;
  reviewerId: number;
  reviewerName: string;
  requestedById: number | null;
  requestedByName: string | null;
  message: string;
  createdAt: string;
  completedAt: string | null;
}

const REQUEST_SELECT = `SELECT r."id", r."studyId", r."batchId", r."reviewerId", ru."name" AS "reviewerName", r."requestedById", qu."name" AS "requestedByName",
  r."message", r."createdAt", r."completedAt"
  FROM "review_requests" r JOIN "users" ru ON ru."id" = r."reviewerId" LEFT JOIN "users" qu ON qu."id" = r."requestedById"`;

function requestDto(r: RequestDbRow): ReviewRequestDto {
  return {
    id: r.id,
    studyId: r.studyId,
    batchId: r.batchId,
    reviewer: { id: r.reviewerId, name: r.reviewerName },
    requestedBy: person(r.requestedById, r.requestedByName),
    message: r.message,
    createdAt: iso(r.createdAt)!,
    completedAt: iso(r.completedAt),
  };
}

export function requestsOf(db: SyncDb, batchId: number): ReviewRequestDto[] {
  return (db.prepare(`${REQUEST_SELECT} WHERE r."batchId" = ? ORDER BY r."id"`).all(batchId) as RequestDbRow[]).map(requestDto);
}

export function requestById(db: SyncDb, studyId: number, requestId: number): ReviewRequestDto | null {
  const row = db.prepare(`${REQUEST_SELECT} WHERE r."studyId" = ? AND r."id" = ?`).get(studyId, requestId) as RequestDbRow | undefined;
  return row ? requestDto(row) : null;
}

/**
 * Asks members of the batch's study to review it. Everyone named must be a member; a member who has an
 * open request for this batch already is not asked twice (their open request is returned). The e-mails
 * go out through the notification outbox, recorded in the same transaction.
 */
export async function createRequests(
  dataSource: DataSource,
  batch: LoadedBatch,
  lead: { id: number; name: string },
  body: { userIds: number[]; message: string },
): Promise<{ requests: ReviewRequestDto[]; asked: number[]; alreadyAsked: number[] }> {
  requireDone(batch);
  const db = syncDb(dataSource);
  const studyId = batch.row.studyId;
  const ids = [...new Set(body.userIds)];
  const memberRows = db
    .prepare(`SELECT "userId" FROM "memberships" WHERE "studyId" = ? AND "userId" IN (${ids.map(() => '?').join(',')})`)
    .all(studyId, ...ids) as { userId: number }[];
  const memberIds = new Set(memberRows.map((m) => m.userId));
  const strangers = ids.filter((id) => !memberIds.has(id));
  if (strangers.length) {
    const fields: Record<string, string[]> = {};
    body.userIds.forEach((id, k) => {
      if (!memberIds.has(id)) fields[`userIds.${k}`] = [`User ${id} is not a member of this study; invite them on the team page first.`];
    });
    throw new ApiError(400, 'validation_failed', `Only members of the study can be asked to review; not member${strangers.length > 1 ? 's' : ''}: ${strangers.join(', ')}.`, {
      fields,
    });
  }
  const result = await inSyncTransaction(db, (tx) => {
    const open = tx
      .prepare(`SELECT "reviewerId" FROM "review_requests" WHERE "batchId" = ? AND "completedAt" IS NULL`)
      .all(batch.row.id) as { reviewerId: number }[];
    const openIds = new Set(open.map((o) => o.reviewerId));
    const asked = ids.filter((id) => !openIds.has(id));
    const alreadyAsked = ids.filter((id) => openIds.has(id));
    const now = sqlNow();
    const insert = tx.prepare(`INSERT INTO "review_requests" ("studyId", "batchId", "reviewerId", "requestedById", "message", "createdAt") VALUES (?, ?, ?, ?, ?, ?)`);
    for (const id of asked) insert.run(studyId, batch.row.id, id, lead.id, body.message, now);
    if (asked.length) {
      recordEvent(tx, 'review_requested', studyId, batch.row.id, {
        reviewerIds: asked,
        requestedById: lead.id,
        requestedBy: lead.name,
        message: body.message,
      } satisfies ReviewRequestedPayload);
    }
    return { asked, alreadyAsked };
  });
  wakeAfterCommit(db);
  const all = requestsOf(db, batch.row.id);
  const requests = ids
    .map((id) => all.filter((r) => r.reviewer.id === id).pop())
    .filter((r): r is ReviewRequestDto => r !== undefined);
  return { requests, ...result };
}

export async function completeRequest(dataSource: DataSource, request: ReviewRequestDto): Promise<ReviewRequestDto> {
  const db = syncDb(dataSource);
  if (request.completedAt === null) {
    await inSyncTransaction(db, (tx) => tx.prepare(`UPDATE "review_requests" SET "completedAt" = ? WHERE "id" = ? AND "completedAt" IS NULL`).run(sqlNow(), request.id));
  }
  return requestById(db, request.studyId, request.id)!;
}

/** Open review requests of a user, newest first, with how far each batch's review has come. */
export function inboxOf(dataSource: DataSource, userId: number): InboxItem[] {
  const db = syncDb(dataSource);
  const rows = db
    .prepare(
      `${REQUEST_SELECT} JOIN "memberships" m ON m."studyId" = r."studyId" AND m."userId" = r."reviewerId"
       WHERE r."reviewerId" = ? AND r."completedAt" IS NULL ORDER BY r."id" DESC`,
    )
    .all(userId) as RequestDbRow[];
  const items: InboxItem[] = [];
  for (const row of rows) {
    const batch = getBatch(dataSource, row.studyId, row.batchId);
    if (!batch) continue;
    const study = db.prepare(`SELECT "name" FROM "studies" WHERE "id" = ?`).get(row.studyId) as { name: string };
    const counts = verdictCounts(db, batch);
    items.push({ request: requestDto(row), studyName: study.name, batchLabel: batch.row.label, reviewed: counts.total - counts.awaiting, total: counts.total });
  }
  return items;
}

// ---------------------------------------------------------------- sign-off

interface SignoffDbRow {
  id: number;
  batchId: number;
  signedById: number | null;
  signedByName: string;
  note: string;
  counts: string;
  signedAt: string;
}

function signoffDto(r: SignoffDbRow): SignoffDto {
  return {
    id: r.id,
    batchId: r.batchId,
    signedBy: person(r.signedById, r.signedByName),
    signedAt: iso(r.signedAt)!,
    note: r.note,
    counts: JSON.parse(r.counts) as VerdictCounts,
  };
}

/** Sign-offs of a batch's report, newest first. */
export function signoffsOf(db: SyncDb, batchId: number): SignoffDto[] {
  return (db.prepare(`SELECT * FROM "report_signoffs" WHERE "batchId" = ? ORDER BY "id" DESC`).all(batchId) as SignoffDbRow[]).map(signoffDto);
}

export async function signOff(dataSource: DataSource, batch: LoadedBatch, lead: { id: number; name: string }, note: string): Promise<SignoffDto> {
  requireDone(batch);
  const db = syncDb(dataSource);
  const dto = await inSyncTransaction(db, (tx) => {
    const counts = verdictCounts(tx, batch);
    const signedAt = new Date();
    const result = tx
      .prepare(`INSERT INTO "report_signoffs" ("studyId", "batchId", "signedById", "signedByName", "note", "counts", "signedAt") VALUES (?, ?, ?, ?, ?, ?, ?)`)
      .run(batch.row.studyId, batch.row.id, lead.id, lead.name, note, JSON.stringify(counts), sqlNow(signedAt));
    const id = Number(result.lastInsertRowid);
    recordEvent(tx, 'report_signed', batch.row.studyId, batch.row.id, {
      signoffId: id,
      signedById: lead.id,
      signedBy: lead.name,
      signedAt: signedAt.toISOString(),
      counts,
    } satisfies ReportSignedPayload);
    return signoffDto(tx.prepare(`SELECT * FROM "report_signoffs" WHERE "id" = ?`).get(id) as SignoffDbRow);
  });
  wakeAfterCommit(db);
  return dto;
}

/** True when a verdict or comment changed after the newest sign-off. */
export function changedSince(db: SyncDb, batchId: number, signoff: SignoffDto | undefined): boolean {
  if (!signoff) return false;
  const last = lastReviewChange(db, batchId);
  return last !== null && last.getTime() > new Date(signoff.signedAt).getTime();
}

// ---------------------------------------------------------------- the board

export function boardOf(dataSource: DataSource, batch: LoadedBatch): BoardResponse {
  const db = syncDb(dataSource);
  const verdicts = verdictsOf(db, batch.row.id);
  const commentCounts = new Map(
    (
      db
        .prepare(`SELECT "statistic", "period", COUNT(*) AS n FROM "review_comments" WHERE "batchId" = ? GROUP BY "statistic", "period"`)
        .all(batch.row.id) as { statistic: string; period: number; n: number }[]
    ).map((r) => [cardKey(r.statistic, r.period), Number(r.n)]),
  );
  const cards: BoardCard[] = cardsOf(batch).map((c) => ({
    statistic: c.statistic,
    label: c.label,
    period: c.period,
    verdict: verdicts.get(cardKey(c.statistic, c.period)) ?? null,
    comments: commentCounts.get(cardKey(c.statistic, c.period)) ?? 0,
  }));
  return {
    studyId: batch.row.studyId,
    batchId: batch.row.id,
    batchLabel: batch.row.label,
    periods: batch.summary.periods,
    cards,
    counts: countVerdicts(cards.map((c) => c.verdict?.verdict ?? null)),
    requests: requestsOf(db, batch.row.id),
    signoff: signoffsOf(db, batch.row.id)[0] ?? null,
  };
}
