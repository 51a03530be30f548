/**
 * The job kind registry: what each kind of job does on the main thread (plan, store, finish) and
 * which module its workers run. Kinds register once at import time (see README.md).
 */
import type { DataSource } from 'typeorm';
import type { SyncDb } from '../db/sync';

/** The synchronous database handle a kind writes with, inside the queue's transaction. */
export type { SyncDb };

export interface ChunkPlan<Chunk> {
  /** What the worker needs besides the job's context (structured-cloneable, small). */
  chunk: Chunk;
  /** Work units in this chunk (e.g. chains), for progress and time estimates. */
  units: number;
}

/** What a kind sees of a job. */
export interface JobInfo<Payload> {
  id: number;
  kind: string;
  payload: Payload;
  attempts: number;
}

/** Live reporting from inside a chunk (worker side). */
export interface ChunkContext {
  /** Units of this chunk done so far (shown as live progress; the stored progress moves per chunk). */
  progress(unitsDone: number): void;
  /** A line for the job's log. */
  log(line: string): void;
}

/**
 * The module named by `workerModule` must export
 *   runChunk(context: Context, chunk: Chunk, ctx: ChunkContext): Result | Promise<Result>
 * It runs in a worker thread: pure computation, no database. Typed arrays in the result (at any depth up
 * to three levels) are transferred, not copied.
 */
export type RunChunk<Context, Chunk, Result> = (context: Context, chunk: Chunk, ctx: ChunkContext) => Result | Promise<Result>;

export interface JobKind<Payload = unknown, Chunk = unknown, Context = unknown, Result = unknown> {
  /**
   * Split the job into chunks. Must be deterministic: it is called again when the job resumes after a
   * restart, and chunk i must mean the same work every time. Throw an Error with a plain message for a
   * payload that cannot run (enqueue then fails and stores nothing).
   */
  planChunks(payload: Payload): ChunkPlan<Chunk>[];
  /** Absolute path of the worker module (a .ts file is fine: workers load tsx). */
  workerModule: string;
  /**
   * Build what every worker needs for this job (e.g. the study's networks), on the main thread, once per
   * run of the job (again after a restart). Sent once to each worker that takes a chunk of the job.
   */
  loadContext(job: JobInfo<Payload>, dataSource: DataSource): Promise<Context> | Context;
  /**
   * Store one chunk's result. Runs inside the transaction that also records the chunk as done and moves
   * the job's progress, so either all of it is stored or none. Synchronous on purpose (better-sqlite3):
   * nothing else can interleave with it.
   */
  storeChunk(db: SyncDb, job: JobInfo<Payload>, chunkIndex: number, chunk: Chunk, result: Result): void;
  /** After the last chunk, in the transaction that marks the job done. */
  finish?(db: SyncDb, job: JobInfo<Payload>): void;
  /** When the job fails or is cancelled, in the transaction that records it (stored chunks stay unless you delete them). */
  onEnd?(db: SyncDb, job: JobInfo<Payload>, state: 'failed' | 'cancelled', reason: string): void;
}

const kinds = new Map<string, JobKind<never, never, never, never>>();

/**
 * Register a job kind under a name (letters, digits, "-" and "_", at most 40 characters). Registering
 * the same name twice with a different handler throws; the same handler again is a no-op.
 */
export function registerJobKind<Payload, Chunk, Context, Result>(
  name: string,
  kind: JobKind<Payload, Chunk, Context, Result>,
): void {
  if (!/^[a-z0-9_-]{1,40}$/i.test(name)) throw new Error(`jobs: a job kind name must be 1-40 letters, digits, "-" or "_", got "${name}"`);
  const existing = kinds.get(name);
  if (existing && existing !== (kind as unknown)) throw new Error(`jobs: the job kind "${name}" is already registered`);
  kinds.set(name, kind as unknown as JobKind<never, never, never, never>);
}

export function getJobKind(name: string): JobKind<unknown, unknown, unknown, unknown> | undefined {
  return kinds.get(name) as JobKind<unknown, unknown, unknown, unknown> | undefined;
}

export function registeredJobKinds(): string[] {
  return [...kinds.keys()];
}
