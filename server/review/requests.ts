/**
 * Review requests: the lead asks reviewers to look at a batch (the team is notified in the same
 * transaction), a reviewer marks a request done, and each person's inbox.
 */
import type { DataSource } from 'typeorm';
import type { InboxItem, ReviewRequestDto } from '../../shared/review';
import { getBatch, type LoadedBatch } from '../batches/service';
import { inSyncTransaction, sqlNow, syncDb, type SyncDb } from '../db/sync';
import { ApiError } from '../errors';
import { recordEvent, wakeAfterCommit, type ReviewRequestedPayload } from '../notify/notifier';
import { iso, person, requireDone, verdictCounts } from './service';

export interface RequestDbRow {
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

export const REQUEST_SELECT = `SELECT r."id", r."studyId", r."batchId", r."reviewerId", ru."name" AS "reviewerName", r."requestedById", qu."name" AS "requestedByName",
  r."message", r."createdAt", r."completedAt"
  FROM "review_requests" r JOIN "users" ru ON ru."id" = r."reviewerId" LEFT JOIN "users" qu ON qu."id" = r."requestedById"`;

export function requestDto(r: RequestDbRow): ReviewRequestDto {
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
