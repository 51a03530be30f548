/**
 * Synchronous database access: the better-sqlite3 handle under TypeORM, SQL timestamps, and
 * transactions that never interleave with another transaction on the same connection. Used by the
 * job queue and by every feature that writes with the synchronous handle (review, notify, reports).
 *
 * Why synchronous: TypeORM's better-sqlite3 driver shares one connection; two async transactions that
 * overlap silently nest (a SAVEPOINT inside the other), so one's rollback could undo the other's chunk.
 * A synchronous better-sqlite3 transaction runs to the end before any other JavaScript, and we start one
 * only when no async transaction is open.
 */
import type BetterSqlite3 from 'better-sqlite3';
import type { DataSource } from 'typeorm';
import { ApiError } from '../errors';

/** The synchronous database handle (better-sqlite3) under TypeORM's data source. */
export type SyncDb = BetterSqlite3.Database;

export function syncDb(dataSource: DataSource): SyncDb {
  if (dataSource.options.type === 'postgres') {
    // Said plainly to the user: on PostgreSQL only accounts, studies, teams and data work so far.
    throw new ApiError(
      501,
      'not_on_this_database',
      'This server runs on PostgreSQL, where jobs (batches, fits), review and notifications are not available yet: they need the SQLite database for now.',
    );
  }
  const db = (dataSource.driver as unknown as { databaseConnection?: SyncDb }).databaseConnection;
  if (!db || typeof db.prepare !== 'function') {
    throw new Error('jobs: the job queue needs an initialised better-sqlite3 data source');
  }
  return db;
}

/** Timestamps in the format TypeORM writes for "datetime" columns on SQLite (UTC). */
export function sqlNow(date = new Date()): string {
  return date.toISOString().replace('T', ' ').replace('Z', '');
}

/** Reads a "datetime" column value written by TypeORM, by SQLite's datetime('now') or by sqlNow. */
export function parseSqlDate(value: string | null | undefined): Date | null {
  if (value == null) return null;
  return new Date(value.includes('T') ? value : value.replace(' ', 'T') + 'Z');
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/**
 * Runs `fn` in a synchronous transaction as soon as no other transaction is open on the connection
 * (waiting a millisecond at a time, at most `maxWaitMs`). All of `fn` commits, or nothing.
 */
export async function inSyncTransaction<T>(db: SyncDb, fn: (db: SyncDb) => T, maxWaitMs = 30_000): Promise<T> {
  const started = Date.now();
  while (db.inTransaction) {
    if (Date.now() - started > maxWaitMs) throw new Error('jobs: the database stayed inside another transaction for too long');
    await sleep(1);
  }
  return db.transaction(() => fn(db))();
}

/** The same, for callers that are already synchronous: throws if another transaction is open. */
export function inSyncTransactionNow<T>(db: SyncDb, fn: (db: SyncDb) => T): T {
  if (db.inTransaction) throw new Error('jobs: another transaction is open on this connection; use inSyncTransaction');
  return db.transaction(() => fn(db))();
}
