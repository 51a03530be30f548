/** Comment threads on the review cards: read and add (only on finished batches). */
import type { DataSource } from 'typeorm';
import type { AuxStatisticId } from '../../shared/auxStatistics';
import type { CommentDto } from '../../shared/review';
import type { LoadedBatch } from '../batches/service';
import { inSyncTransaction, sqlNow, syncDb, type SyncDb } from '../db/sync';
import { checkCard, iso, person, requireDone } from './service';

export interface CommentDbRow {
  id: number;
  statistic: string;
  period: number;
  authorId: number | null;
  authorName: string;
  body: string;
  createdAt: string;
}

export function commentDto(r: CommentDbRow): CommentDto {
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
