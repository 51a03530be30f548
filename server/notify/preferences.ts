/**
 * Notification preferences per user: every kind is on by default (no row = all on). Read and
 * written with the synchronous database handle.
 */
import { DEFAULT_PREFERENCES, type NotificationPreferences } from '../../shared/review';
import { sqlNow, type SyncDb } from '../db/sync';

export type PreferenceKey = keyof NotificationPreferences;

interface PreferenceRow {
  batchEnded: number;
  reviewRequested: number;
  reportSigned: number;
}

export function preferencesOf(db: SyncDb, userId: number): NotificationPreferences {
  const row = db
    .prepare(`SELECT "batchEnded", "reviewRequested", "reportSigned" FROM "notification_preferences" WHERE "userId" = ?`)
    .get(userId) as PreferenceRow | undefined;
  if (!row) return { ...DEFAULT_PREFERENCES };
  return { batchEnded: !!row.batchEnded, reviewRequested: !!row.reviewRequested, reportSigned: !!row.reportSigned };
}

/** Changes the given preferences (the others keep their value) and returns the result. */
export function updatePreferences(db: SyncDb, userId: number, change: Partial<NotificationPreferences>): NotificationPreferences {
  const next = { ...preferencesOf(db, userId), ...change };
  db.prepare(
    `INSERT INTO "notification_preferences" ("userId", "batchEnded", "reviewRequested", "reportSigned", "updatedAt") VALUES (?, ?, ?, ?, ?)
     ON CONFLICT ("userId") DO UPDATE SET "batchEnded" = excluded."batchEnded", "reviewRequested" = excluded."reviewRequested",
       "reportSigned" = excluded."reportSigned", "updatedAt" = excluded."updatedAt"`,
  ).run(userId, next.batchEnded ? 1 : 0, next.reviewRequested ? 1 : 0, next.reportSigned ? 1 : 0, sqlNow());
  return next;
}

/** Which of the given users want notifications of a kind. */
export function wanting(db: SyncDb, userIds: number[], key: PreferenceKey): number[] {
  return userIds.filter((id) => preferencesOf(db, id)[key]);
}
