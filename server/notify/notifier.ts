/**
 * Notifications: an outbox of events in SQLite, written in the same transaction as what caused them
 * (a batch's end, a review request, a report sign-off), and a dispatcher that turns each pending
 * event into e-mails through the app's Mailer, for the members whose preferences allow it.
 *
 * The batch job's hooks only see the synchronous database handle, so the dispatcher of a data source
 * is registered under that handle (registerNotifier, called when the app is built) and woken after
 * the hook's transaction commits. An event recorded while no dispatcher is registered (a seed script)
 * waits in the table until the next app on that database flushes.
 */
import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import { parseSqlDate, sqlNow, syncDb, type SyncDb } from '../db/sync';
import type { Mailer, MailMessage } from '../mail/mailer';
import { wanting, type PreferenceKey } from './preferences';
import { batchFailedMail, batchFinishedMail, lineupInvitedMail, reportSignedMail, reviewRequestedMail } from './templates';

export const NOTIFICATION_KINDS = ['batch_finished', 'batch_failed', 'review_requested', 'report_signed', 'lineup_invited'] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];

/** An event is tried this many times before it is left with its error. */
export const MAX_ATTEMPTS = 3;

export interface ReviewRequestedPayload {
  reviewerIds: number[];
  requestedById: number;
  requestedBy: string;
  message: string;
}
export interface LineupInvitedPayload {
  lineupId: number;
  reviewerIds: number[];
  invitedBy: string;
  statisticLabel: string;
  panels: number;
  message: string;
}
export interface ReportSignedPayload {
  signoffId: number;
  signedById: number;
  signedBy: string;
  signedAt: string;
  counts: { pass: number; fail: number; unsure: number; awaiting: number };
}
export interface BatchFailedPayload {
  reason: string;
}

interface EventRow {
  id: number;
  kind: NotificationKind;
  studyId: number;
  batchId: number | null;
  payload: string;
  attempts: number;
}

// ---------------------------------------------------------------- recording (inside a transaction)

export function recordEvent(db: SyncDb, kind: NotificationKind, studyId: number, batchId: number | null, payload: object): number {
  const result = db
    .prepare(`INSERT INTO "notification_events" ("kind", "studyId", "batchId", "payload", "createdAt", "attempts") VALUES (?, ?, ?, ?, ?, 0)`)
    .run(kind, studyId, batchId, JSON.stringify(payload), sqlNow());
  return Number(result.lastInsertRowid);
}

/**
 * For the batch job's finish and onEnd hooks: records that a batch finished (state 'done') or failed,
 * and wakes the dispatcher once the hook's transaction has committed. A cancelled batch tells nobody
 * (someone on the team cancelled it).
 */
export function recordBatchEnded(db: SyncDb, batchId: number, state: 'done' | 'failed' | 'cancelled', reason = ''): void {
  if (state === 'cancelled') return;
  const row = db.prepare(`SELECT "studyId" FROM "batches" WHERE "id" = ?`).get(batchId) as { studyId: number } | undefined;
  if (!row) return;
  if (state === 'done') recordEvent(db, 'batch_finished', row.studyId, batchId, {});
  else recordEvent(db, 'batch_failed', row.studyId, batchId, { reason } satisfies BatchFailedPayload);
  wakeAfterCommit(db);
}

// ---------------------------------------------------------------- dispatching

export interface Notifier {
  /** Sends every pending event; resolves when done (never rejects). */
  flush(): Promise<void>;
}

const registry = new WeakMap<SyncDb, Notifier>();

/** Makes the dispatcher of a data source findable from its synchronous handle (the job hooks). */
export function registerNotifier(dataSource: DataSource, notifier: Notifier): void {
  registry.set(syncDb(dataSource), notifier);
}

/** Wakes the dispatcher of this handle after the current synchronous transaction has committed. */
export function wakeAfterCommit(db: SyncDb): void {
  const notifier = registry.get(db);
  if (!notifier) return;
  setImmediate(() => void notifier.flush());
}

interface Recipient {
  id: number;
  email: string;
  name: string;
}

function members(db: SyncDb, studyId: number): Recipient[] {
  return db
    .prepare(`SELECT u."id", u."email", u."name" FROM "memberships" m JOIN "users" u ON u."id" = m."userId" WHERE m."studyId" = ? ORDER BY u."id"`)
    .all(studyId) as Recipient[];
}

function usersByIds(db: SyncDb, ids: number[]): Recipient[] {
  if (ids.length === 0) return [];
  return db.prepare(`SELECT "id", "email", "name" FROM "users" WHERE "id" IN (${ids.map(() => '?').join(',')}) ORDER BY "id"`).all(...ids) as Recipient[];
}

function filterBy(db: SyncDb, people: Recipient[], key: PreferenceKey): Recipient[] {
  const ok = new Set(wanting(db, people.map((p) => p.id), key));
  return people.filter((p) => ok.has(p.id));
}

export function createNotifier(deps: { dataSource: DataSource; mailer: Mailer; config: Pick<Config, 'publicUrl'>; log?: (line: string) => void }): Notifier {
  const { dataSource, mailer, config } = deps;
  const log = deps.log ?? ((line: string) => console.error(line));
  let running: Promise<void> | null = null;
  let again = false;

  /** The messages of one event (an empty list when nobody wants it). */
  function messagesOf(db: SyncDb, event: EventRow): MailMessage[] {
    const study = db.prepare(`SELECT "name" FROM "studies" WHERE "id" = ?`).get(event.studyId) as { name: string } | undefined;
    if (!study) return [];
    const batch =
      event.batchId === null
        ? undefined
        : (db.prepare(`SELECT "label", "chains" FROM "batches" WHERE "id" = ?`).get(event.batchId) as { label: string; chains: number } | undefined);
    if (event.batchId !== null && !batch) return [];
    const base = config.publicUrl.replace(/\/+$/, '');
    const boardLink = `${base}/studies/${event.studyId}/board/${event.batchId}`;
    const payload = JSON.parse(event.payload) as unknown;
    switch (event.kind) {
      case 'batch_finished':
        return filterBy(db, members(db, event.studyId), 'batchEnded').map((r) =>
          batchFinishedMail({ to: r.email, studyName: study.name, batchLabel: batch!.label, chains: batch!.chains, link: boardLink }),
        );
      case 'batch_failed': {
        const p = payload as BatchFailedPayload;
        return filterBy(db, members(db, event.studyId), 'batchEnded').map((r) =>
          batchFailedMail({ to: r.email, studyName: study.name, batchLabel: batch!.label, reason: p.reason || 'not recorded', link: `${base}/studies/${event.studyId}` }),
        );
      }
      case 'review_requested': {
        const p = payload as ReviewRequestedPayload;
        return filterBy(db, usersByIds(db, p.reviewerIds), 'reviewRequested').map((r) =>
          reviewRequestedMail({ to: r.email, studyName: study.name, batchLabel: batch!.label, requestedBy: p.requestedBy, message: p.message, link: boardLink }),
        );
      }
      case 'lineup_invited': {
        const p = payload as LineupInvitedPayload;
        return filterBy(db, usersByIds(db, p.reviewerIds), 'reviewRequested').map((r) =>
          lineupInvitedMail({
            to: r.email,
            studyName: study.name,
            batchLabel: batch!.label,
            invitedBy: p.invitedBy,
            statisticLabel: p.statisticLabel,
            panels: p.panels,
            message: p.message,
            link: `${base}/studies/${event.studyId}/board/${event.batchId}/lineups/${p.lineupId}`,
          }),
        );
      }
      case 'report_signed': {
        const p = payload as ReportSignedPayload;
        const people = members(db, event.studyId).filter((m) => m.id !== p.signedById);
        return filterBy(db, people, 'reportSigned').map((r) =>
          reportSignedMail({
            to: r.email,
            studyName: study.name,
            batchLabel: batch!.label,
            signedBy: p.signedBy,
            signedAt: p.signedAt,
            counts: p.counts,
            link: `${base}/studies/${event.studyId}/report?batch=${event.batchId}`,
          }),
        );
      }
      default:
        return [];
    }
  }

  async function runOnce(): Promise<void> {
    const db = syncDb(dataSource);
    const pending = db
      .prepare(`SELECT "id", "kind", "studyId", "batchId", "payload", "attempts" FROM "notification_events" WHERE "sentAt" IS NULL AND "attempts" < ? ORDER BY "id"`)
      .all(MAX_ATTEMPTS) as EventRow[];
    for (const event of pending) {
      let error: string | null = null;
      try {
        for (const message of messagesOf(db, event)) await mailer.send(message);
      } catch (e) {
        error = e instanceof Error ? e.message : String(e);
        log(`notify: event ${event.id} (${event.kind}) could not be sent: ${error}`);
      }
      if (!dataSource.isInitialized) return;
      if (error === null) {
        db.prepare(`UPDATE "notification_events" SET "sentAt" = ?, "attempts" = "attempts" + 1, "error" = NULL WHERE "id" = ?`).run(sqlNow(), event.id);
      } else {
        db.prepare(`UPDATE "notification_events" SET "attempts" = "attempts" + 1, "error" = ? WHERE "id" = ?`).run(error.slice(0, 2000), event.id);
      }
    }
  }

  return {
    flush() {
      if (running) {
        again = true;
        return running;
      }
      running = (async () => {
        try {
          do {
            again = false;
            if (!dataSource.isInitialized) return;
            await runOnce();
          } while (again);
        } catch (e) {
          log(`notify: sending notifications failed: ${e instanceof Error ? e.message : String(e)}`);
        } finally {
          running = null;
        }
      })();
      return running;
    },
  };
}

/** When an event was sent (for tests and the admin's eye). */
export function eventSentAt(db: SyncDb, id: number): Date | null {
  const row = db.prepare(`SELECT "sentAt" FROM "notification_events" WHERE "id" = ?`).get(id) as { sentAt: string | null } | undefined;
  return parseSqlDate(row?.sentAt ?? null);
}
