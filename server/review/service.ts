/**
 * The review board on the server: cards (statistic x period of a finished batch) and verdicts with
 * optimistic concurrency and a full history. Comment threads are in ./comments.ts, review requests
 * and the inbox in ./requests.ts, report sign-offs in ./signoffs.ts, the board in ./board.ts.
 * Writes go through the synchronous better-sqlite3 handle inside one transaction
 * each (server/db/sync.ts explains why), so a verdict and its history row commit together or not at all.
 */
import type { DataSource } from 'typeorm';
import type { AuxStatisticId } from '../../shared/auxStatistics';
import {
  countVerdicts,
  type ParsedVerdictBody,
  type PersonRef,
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

export const iso = (value: string | null | undefined): string | null => parseSqlDate(value ?? null)?.toISOString() ?? null;

export const person = (id: number | null, name: string | null | undefined): PersonRef | null =>
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

export const cardKey = (statistic: string, period: number) => `${statistic}@${period}`;

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

/** True when a verdict or comment changed after the newest sign-off. */
export function changedSince(db: SyncDb, batchId: number, signoff: SignoffDto | undefined): boolean {
  if (!signoff) return false;
  const last = lastReviewChange(db, batchId);
  return last !== null && last.getTime() > new Date(signoff.signedAt).getTime();
}

// ---------------------------------------------------------------- the board
