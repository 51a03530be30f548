/** A job as the API shows it: its row, with the live progress and time left the running queue adds. */
import { parseSqlDate } from '../db/sync';
import type { JobState } from './entities';

/** A job row as the API shows it, with live progress while it runs. */
export interface JobStatus {
  id: number;
  kind: string;
  state: JobState;
  /** Units done: stored chunks plus the live progress of chunks in flight. */
  progressDone: number;
  progressTotal: number;
  chunksDone: number;
  chunksTotal: number;
  attempts: number;
  error: string | null;
  log: string;
  createdAt: Date;
  startedAt: Date | null;
  finishedAt: Date | null;
  /** Seconds left, from this run's pace; null until a chunk has finished or when not running. */
  secondsLeft: number | null;
}

/** The status of a job row; `live` holds what only the running queue knows (chunks in flight, pace). */
export function statusFromRow(row: Record<string, unknown>, live: { progressDone: number; secondsLeft: number | null }): JobStatus {
  return {
    id: Number(row.id),
    kind: String(row.kind),
    state: row.state as JobState,
    progressDone: live.progressDone,
    progressTotal: Number(row.progressTotal),
    chunksDone: Number(row.chunksDone),
    chunksTotal: Number(row.chunksTotal),
    attempts: Number(row.attempts),
    error: (row.error as string | null) ?? null,
    log: String(row.log ?? ''),
    createdAt: parseSqlDate(row.createdAt as string)!,
    startedAt: parseSqlDate(row.startedAt as string | null),
    finishedAt: parseSqlDate(row.finishedAt as string | null),
    secondsLeft: live.secondsLeft,
  };
}
