/**
 * Report sign-offs: the lead signs off a batch's fit report (with the verdict counts at that moment,
 * and, when the report had concerns, the acknowledged concerns and the reason; see
 * server/reports/signoffGuard.ts).
 */
import type { DataSource } from 'typeorm';
import type { SignoffAcknowledgement, SignoffDto, VerdictCounts } from '../../shared/review';
import type { LoadedBatch } from '../batches/service';
import { inSyncTransaction, sqlNow, syncDb, type SyncDb } from '../db/sync';
import { recordEvent, wakeAfterCommit, type ReportSignedPayload } from '../notify/notifier';
import { iso, person, requireDone, verdictCounts } from './service';

export interface SignoffDbRow {
  id: number;
  batchId: number;
  signedById: number | null;
  signedByName: string;
  note: string;
  counts: string;
  signedAt: string;
  acknowledgement: string | null;
}

export function signoffDto(r: SignoffDbRow): SignoffDto {
  return {
    id: r.id,
    batchId: r.batchId,
    signedBy: person(r.signedById, r.signedByName),
    signedAt: iso(r.signedAt)!,
    note: r.note,
    counts: JSON.parse(r.counts) as VerdictCounts,
    acknowledgement: r.acknowledgement ? (JSON.parse(r.acknowledgement) as SignoffAcknowledgement) : null,
  };
}

/** Sign-offs of a batch's report, newest first. */
export function signoffsOf(db: SyncDb, batchId: number): SignoffDto[] {
  return (db.prepare(`SELECT * FROM "report_signoffs" WHERE "batchId" = ? ORDER BY "id" DESC`).all(batchId) as SignoffDbRow[]).map(signoffDto);
}

/** acknowledgement: the concerns the lead signed off despite, with the reason (null when there were none). */
export async function signOff(
  dataSource: DataSource,
  batch: LoadedBatch,
  lead: { id: number; name: string },
  note: string,
  acknowledgement: SignoffAcknowledgement | null = null,
): Promise<SignoffDto> {
  requireDone(batch);
  const db = syncDb(dataSource);
  const dto = await inSyncTransaction(db, (tx) => {
    const counts = verdictCounts(tx, batch);
    const signedAt = new Date();
    const result = tx
      .prepare(`INSERT INTO "report_signoffs" ("studyId", "batchId", "signedById", "signedByName", "note", "counts", "signedAt", "acknowledgement") VALUES (?, ?, ?, ?, ?, ?, ?, ?)`)
      .run(batch.row.studyId, batch.row.id, lead.id, lead.name, note, JSON.stringify(counts), sqlNow(signedAt), acknowledgement ? JSON.stringify(acknowledgement) : null);
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
