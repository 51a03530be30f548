/**
 * The job queue's rows in SQL, written inside the caller's synchronous transaction: queuing a job,
 * claiming it for this process (state running, one more attempt), its log, and ending it (done,
 * failed, cancelled) with the kind's hooks. The scheduling around them is in ./queue.ts.
 */
import { sqlNow } from '../db/sync';
import type { JobState } from './entities';
import { getJobKind, type JobInfo, type JobKind, type SyncDb } from './registry';

export const TERMINAL: ReadonlySet<JobState> = new Set(['done', 'failed', 'cancelled']);
export const LOG_LIMIT = 65_536;

export function appendLog(db: SyncDb, jobId: number, line: string): void {
  const stamped = `${new Date().toISOString()} ${line}\n`;
  db.prepare(`UPDATE "jobs" SET "log" = substr("log" || ?, -${LOG_LIMIT}), "updatedAt" = ? WHERE "id" = ?`).run(stamped, sqlNow(), jobId);
}

/**
 * Insert a queued job row (synchronously, so a caller can do it inside its own transaction together
 * with its own rows). Plans the chunks first: a payload the kind refuses throws and stores nothing.
 * Call `queue.wake()` after the caller's transaction commits.
 */
export function createJobRow(db: SyncDb, kind: string, payload: unknown): number {
  const handler = getJobKind(kind);
  if (!handler) throw new Error(`jobs: unknown job kind "${kind}"`);
  const plan = handler.planChunks(payload);
  if (plan.length === 0) throw new Error(`jobs: a ${kind} job must have at least one chunk`);
  const units = plan.reduce((sum, p) => sum + p.units, 0);
  const now = sqlNow();
  const result = db
    .prepare(
      `INSERT INTO "jobs" ("kind", "payload", "state", "progressDone", "progressTotal", "chunksDone", "chunksTotal", "log", "attempts", "createdAt", "updatedAt")
       VALUES (?, ?, 'queued', 0, ?, 0, ?, ?, 0, ?, ?)`,
    )
    .run(kind, JSON.stringify(payload), units, plan.length, `${new Date().toISOString()} queued: ${plan.length} chunks, ${units} units\n`, now, now);
  return Number(result.lastInsertRowid);
}

/**
 * Claims an open job for this process: state running, one more attempt, the start time kept from an
 * earlier run, and a log line. Returns false (changing nothing) when the job has ended meanwhile.
 */
export function claimJobRow(db: SyncDb, jobId: number, logLine: string): boolean {
  const current = db.prepare(`SELECT "state" FROM "jobs" WHERE "id" = ?`).get(jobId) as { state: JobState } | undefined;
  if (!current || TERMINAL.has(current.state)) return false;
  const now = sqlNow();
  db.prepare(`UPDATE "jobs" SET "state" = 'running', "attempts" = "attempts" + 1, "startedAt" = coalesce("startedAt", ?), "updatedAt" = ? WHERE "id" = ?`).run(now, now, jobId);
  appendLog(db, jobId, logLine);
  return true;
}

/** Marks a running job done, after its kind's finish hook, in the caller's transaction. */
export function completeJobRow(db: SyncDb, job: { id: number; kind: JobKind<unknown, unknown, unknown, unknown>; info: JobInfo<unknown> }): void {
  job.kind.finish?.(db, job.info);
  const now = sqlNow();
  db.prepare(`UPDATE "jobs" SET "state" = 'done', "finishedAt" = ?, "updatedAt" = ? WHERE "id" = ?`).run(now, now, job.id);
  appendLog(db, job.id, 'done');
}


/** Marks a queued/running job as failed or cancelled (with the kind's onEnd hook); returns false if it had already ended. */
export function endJobRow(db: SyncDb, jobId: number, state: 'failed' | 'cancelled', reason: string): boolean {
  const row = db.prepare(`SELECT "state", "kind", "payload", "attempts" FROM "jobs" WHERE "id" = ?`).get(jobId) as
    | { state: JobState; kind: string; payload: string; attempts: number }
    | undefined;
  if (!row || TERMINAL.has(row.state)) return false;
  const now = sqlNow();
  db.prepare(`UPDATE "jobs" SET "state" = ?, "error" = ?, "finishedAt" = ?, "updatedAt" = ? WHERE "id" = ?`).run(
    state,
    state === 'failed' ? reason : null,
    now,
    now,
    jobId,
  );
  appendLog(db, jobId, `${state}: ${reason}`);
  const kind = getJobKind(row.kind);
  kind?.onEnd?.(db, { id: jobId, kind: row.kind, payload: JSON.parse(row.payload), attempts: row.attempts }, state, reason);
  return true;
}

