/**
 * The embedded job queue: jobs in SQLite, chunks computed by a pool of worker threads, each finished
 * chunk stored in one transaction. A crash loses at most the chunks in flight; `start()` resumes every
 * unfinished job. See README.md for the design and for adding a job kind.
 *
 * This file schedules: it claims open jobs, hands chunks to the worker threads, stores their results
 * and emits progress events. The worker threads are in ./pool.ts, the rows' SQL in ./rows.ts,
 * the API's status shape in ./status.ts and the one queue per data source in ./queues.ts.
 */
import { EventEmitter } from 'node:events';
import { availableParallelism } from 'node:os';
import type { DataSource } from 'typeorm';
import type { JobState } from './entities';
import { inSyncTransaction, sqlNow, syncDb } from '../db/sync';
import type { ChunkBackend, ChunkBackendEvents, ChunkTask } from './backend';
import { ThreadBackend } from './threads';
import { getJobKind, type ChunkPlan, type JobInfo, type JobKind, type SyncDb } from './registry';
import { appendLog, claimJobRow, completeJobRow, createJobRow, endJobRow, TERMINAL } from './rows';
import { statusFromRow, type JobStatus } from './status';

export interface JobQueueOptions {
  /** Worker threads (default: WAVEFIT_WORKERS, else the number of cores). */
  workers?: number;
  /** How often a chunk is retried after its worker died (default 3). */
  maxChunkRetries?: number;
  /** Idle workers are stopped after this long without work (default 60 s). */
  idleShutdownMs?: number;
  /** Where queue events are reported (default: nowhere). */
  log?: (line: string) => void;
  /** Where chunks run (default: worker threads of this process, see ./backend.ts). */
  backend?: ChunkBackend;
}



export function defaultWorkerCount(env: Record<string, string | undefined> = process.env): number {
  const raw = env.WAVEFIT_WORKERS;
  if (raw) {
    const n = Number(raw);
    if (!Number.isInteger(n) || n < 1 || n > 64) throw new Error(`jobs: WAVEFIT_WORKERS must be a whole number 1..64, got "${raw}"`);
    return n;
  }
  return Math.max(1, availableParallelism());
}



interface ActiveJob {
  id: number;
  kind: JobKind<unknown, unknown, unknown, unknown>;
  info: JobInfo<unknown>;
  plan: ChunkPlan<unknown>[];
  done: Set<number>;
  /** Chunks in a worker or waiting to be stored. */
  busy: Set<number>;
  retries: Map<number, number>;
  context: unknown;
  ended: boolean;
  sessionStart: number;
  sessionUnits: number;
  unitsDone: number;
  total: number;
}



export class JobQueue extends EventEmitter {
  readonly dataSource: DataSource;
  readonly workerCount: number;
  private readonly maxChunkRetries: number;
  private readonly report: (line: string) => void;
  readonly backend: ChunkBackend;
  private readonly events: ChunkBackendEvents;
  private readonly active = new Map<number, ActiveJob>();
  private readonly waiters = new Map<number, ((state: JobState) => void)[]>();
  private started = false;
  private stopped = false;
  private dirty = true;
  private pumping = false;
  private pumpAgain = false;
  private nextTaskId = 1;
  /** Jobs whose context failed to load or whose kind is unknown, so they are not retried in a loop. */
  private readonly skipped = new Set<number>();

  constructor(dataSource: DataSource, options: JobQueueOptions = {}) {
    super();
    this.dataSource = dataSource;
    this.workerCount = options.workers ?? defaultWorkerCount();
    if (!Number.isInteger(this.workerCount) || this.workerCount < 1) throw new Error(`jobs: workers must be a whole number >= 1, got ${this.workerCount}`);
    this.maxChunkRetries = options.maxChunkRetries ?? 3;
    this.report = options.log ?? (() => undefined);
    this.backend = options.backend ?? new ThreadBackend(this.workerCount, options.idleShutdownMs ?? 60_000);
    this.events = {
      result: (task, result, workMs) => this.onResult(task, result, workMs),
      error: (task, message) => this.onChunkError(task, message),
      lost: (task, reason) => void this.onLost(task, reason),
      log: (task, line) =>
        void inSyncTransaction(this.db, (db) => appendLog(db, task.jobId, `chunk ${task.chunkIndex}: ${line}`)).catch(() => undefined),
      report: (line) => this.report(line),
    };
  }

  private get db(): SyncDb {
    return syncDb(this.dataSource);
  }

  get isRunning(): boolean {
    return this.started && !this.stopped;
  }

  /** Start working: resumes every queued or running job in the database. Calling it again does nothing. */
  async start(): Promise<void> {
    if (this.started && !this.stopped) return;
    this.started = true;
    this.stopped = false;
    this.dirty = true;
    this.skipped.clear();
    await this.backend.start(this.events);
    await this.pump();
  }

  /**
   * Stop working: terminates the workers. Unfinished jobs stay queued or running in the database and
   * resume at the next start (chunks in flight are computed again).
   */
  async stop(): Promise<void> {
    this.stopped = true;
    await this.backend.stop();
    this.active.clear();
  }

  /** Tell the queue that new jobs may be waiting (after createJobRow in a caller's transaction). */
  wake(): void {
    this.dirty = true;
    if (this.started && !this.stopped) void this.pump();
  }

  /** Queue a job: plans its chunks (throws on a refused payload, storing nothing) and returns its id. */
  async enqueue(kind: string, payload: unknown): Promise<number> {
    const id = await inSyncTransaction(this.db, (db) => createJobRow(db, kind, payload));
    this.wake();
    return id;
  }

  /**
   * Cancel a queued or running job: its state becomes cancelled at once and the workers busy with its
   * chunks are terminated. Returns false when the job had already ended (or does not exist), and the
   * milliseconds until its last worker stopped.
   */
  async cancel(jobId: number, reason = 'cancelled by a user'): Promise<{ cancelled: boolean; ms: number }> {
    const t0 = performance.now();
    const cancelled = await inSyncTransaction(this.db, (db) => endJobRow(db, jobId, 'cancelled', reason));
    if (cancelled) await this.abandon(jobId, 'cancelled');
    return { cancelled, ms: performance.now() - t0 };
  }

  /** The job with live progress and an estimate of the time left; null when there is no such job. */
  status(jobId: number): JobStatus | null {
    const row = this.db.prepare(`SELECT * FROM "jobs" WHERE "id" = ?`).get(jobId) as Record<string, unknown> | undefined;
    if (!row) return null;
    return this.toStatus(row);
  }

  /** Several jobs by id (missing ids are left out). */
  statuses(jobIds: number[]): Map<number, JobStatus> {
    const out = new Map<number, JobStatus>();
    if (jobIds.length === 0) return out;
    const rows = this.db
      .prepare(`SELECT * FROM "jobs" WHERE "id" IN (${jobIds.map(() => '?').join(',')})`)
      .all(...jobIds) as Record<string, unknown>[];
    for (const row of rows) out.set(Number(row.id), this.toStatus(row));
    return out;
  }

  private toStatus(row: Record<string, unknown>): JobStatus {
    const id = Number(row.id);
    const state = row.state as JobState;
    const job = this.active.get(id);
    let progressDone = Number(row.progressDone);
    let secondsLeft: number | null = null;
    if (job && !job.ended && state === 'running') {
      let live = 0;
      for (const task of this.backend.inFlight()) if (task.jobId === id) live += Math.min(task.liveUnits, task.units);
      progressDone = Math.min(Number(row.progressTotal), progressDone + live);
      const elapsed = (performance.now() - job.sessionStart) / 1000;
      const pace = job.sessionUnits + live;
      if (pace > 0 && elapsed > 0) secondsLeft = ((Number(row.progressTotal) - progressDone) * elapsed) / pace;
    }
    return statusFromRow(row, { progressDone, secondsLeft });
  }

  /** Resolves with the final state once the job is done, failed or cancelled. */
  whenSettled(jobId: number): Promise<JobState> {
    const row = this.db.prepare(`SELECT "state" FROM "jobs" WHERE "id" = ?`).get(jobId) as { state: JobState } | undefined;
    if (!row) return Promise.reject(new Error(`jobs: there is no job ${jobId}`));
    if (TERMINAL.has(row.state)) return Promise.resolve(row.state);
    return new Promise((resolve) => {
      const list = this.waiters.get(jobId) ?? [];
      list.push(resolve);
      this.waiters.set(jobId, list);
    });
  }

  /**
   * For durability tests: terminate one busy worker as if it had crashed (the queue is not told).
   * Returns the chunk it was working on, or null when no worker was busy.
   */
  crashWorkerForTest(): { jobId: number; chunkIndex: number } | null {
    return this.backend.crashOneForTest();
  }

  /** Number of live worker threads (for tests and diagnostics). */
  get liveWorkers(): number {
    return this.backend.live;
  }

  // ---------------------------------------------------------------- scheduling

  private async pump(): Promise<void> {
    if (this.pumping) {
      this.pumpAgain = true;
      return;
    }
    this.pumping = true;
    try {
      do {
        this.pumpAgain = false;
        if (this.stopped || !this.started) return;
        if (this.dirty) {
          this.dirty = false;
          await this.loadActiveJobs();
        }
        this.dispatch();
      } while (this.pumpAgain);
    } catch (error) {
      this.report(`jobs: scheduling failed: ${error instanceof Error ? error.message : String(error)}`);
    } finally {
      this.pumping = false;
      this.scheduleIdleShutdown();
    }
  }

  private async loadActiveJobs(): Promise<void> {
    const rows = this.db
      .prepare(`SELECT "id", "kind", "payload", "state", "attempts", "progressDone", "progressTotal" FROM "jobs" WHERE "state" IN ('queued', 'running') ORDER BY "id"`)
      .all() as { id: number; kind: string; payload: string; state: JobState; attempts: number; progressDone: number; progressTotal: number }[];
    for (const row of rows) {
      if (this.active.has(row.id) || this.skipped.has(row.id)) continue;
      const kind = getJobKind(row.kind);
      if (!kind) {
        this.skipped.add(row.id);
        this.report(`jobs: job ${row.id} has kind "${row.kind}", which is not registered in this process; it stays ${row.state}`);
        continue;
      }
      const info: JobInfo<unknown> = { id: row.id, kind: row.kind, payload: JSON.parse(row.payload), attempts: row.attempts + 1 };
      let plan: ChunkPlan<unknown>[];
      let context: unknown;
      try {
        plan = kind.planChunks(info.payload);
        context = await kind.loadContext(info, this.dataSource);
      } catch (error) {
        const message = error instanceof Error ? error.message : String(error);
        await inSyncTransaction(this.db, (db) => endJobRow(db, row.id, 'failed', `could not start: ${message}`));
        this.settle(row.id, 'failed');
        continue;
      }
      const done = new Set(
        (this.db.prepare(`SELECT "chunkIndex" FROM "job_chunks" WHERE "jobId" = ?`).all(row.id) as { chunkIndex: number }[]).map((r) => r.chunkIndex),
      );
      const resumed = row.state === 'running';
      const stillOpen = await inSyncTransaction(this.db, (db) =>
        claimJobRow(db, row.id, resumed ? `resumed: ${done.size} of ${plan.length} chunks were already stored` : `started with ${this.backend.workersLabel}`),
      );
      if (!stillOpen) continue;
      const unitsDone = plan.reduce((sum, p, i) => sum + (done.has(i) ? p.units : 0), 0);
      const job: ActiveJob = {
        id: row.id,
        kind,
        info,
        plan,
        done,
        busy: new Set(),
        retries: new Map(),
        context,
        ended: false,
        sessionStart: performance.now(),
        sessionUnits: 0,
        unitsDone,
        total: plan.reduce((sum, p) => sum + p.units, 0),
      };
      this.active.set(row.id, job);
      if (done.size === plan.length) {
        // Every chunk was stored before a restart, but the job was not marked done: finish it now.
        await this.finishIfComplete(job);
      }
    }
  }

  private dispatch(): void {
    if (this.stopped) return;
    const jobs = [...this.active.values()].filter((j) => !j.ended).sort((a, b) => a.id - b.id);
    let inFlight = this.backend.inFlight().length;
    for (const job of jobs) {
      for (let c = 0; c < job.plan.length; c++) {
        if (job.done.has(c) || job.busy.has(c)) continue;
        if (inFlight >= this.backend.capacity) return;
        this.runChunk(job, c);
        inFlight++;
      }
    }
  }




  private runChunk(job: ActiveJob, chunkIndex: number): void {
    job.busy.add(chunkIndex);
    this.backend.run({
      taskId: this.nextTaskId++,
      jobId: job.id,
      chunkIndex,
      units: job.plan[chunkIndex].units,
      liveUnits: 0,
      modulePath: job.kind.workerModule,
      context: job.context,
      chunk: job.plan[chunkIndex].chunk,
    });
  }

  private onResult(task: ChunkTask, result: unknown, workMs: number): void {
    const job = this.active.get(task.jobId);
    if (!job || job.ended) {
      void this.pump();
      return;
    }
    void this.storeResult(job, task, result, workMs);
    void this.pump();
  }

  private onChunkError(task: ChunkTask, message: string): void {
    const job = this.active.get(task.jobId);
    if (!job || job.ended) {
      void this.pump();
      return;
    }
    job.busy.delete(task.chunkIndex);
    void this.failJob(job, `chunk ${task.chunkIndex} failed: ${message}`);
  }

  private async storeResult(job: ActiveJob, task: ChunkTask, result: unknown, workMs: number): Promise<void> {
    const chunkIndex = task.chunkIndex;
    const chunk = job.plan[chunkIndex];
    let stored = false;
    try {
      stored = await inSyncTransaction(this.db, (db) => {
        const current = db.prepare(`SELECT "state" FROM "jobs" WHERE "id" = ?`).get(job.id) as { state: JobState } | undefined;
        if (!current || current.state !== 'running') return false;
        const exists = db.prepare(`SELECT 1 FROM "job_chunks" WHERE "jobId" = ? AND "chunkIndex" = ?`).get(job.id, chunkIndex);
        if (exists) return false;
        job.kind.storeChunk(db, job.info, chunkIndex, chunk.chunk, result);
        db.prepare(`INSERT INTO "job_chunks" ("jobId", "chunkIndex", "units", "workMs", "finishedAt") VALUES (?, ?, ?, ?, ?)`).run(
          job.id,
          chunkIndex,
          chunk.units,
          workMs,
          sqlNow(),
        );
        db.prepare(
          `UPDATE "jobs" SET "progressDone" = "progressDone" + ?, "chunksDone" = "chunksDone" + 1, "updatedAt" = ? WHERE "id" = ?`,
        ).run(chunk.units, sqlNow(), job.id);
        // Counted inside the transaction, so two chunks stored back to back cannot both miss the end.
        job.done.add(chunkIndex);
        try {
          if (job.done.size === job.plan.length) completeJobRow(db, job);
        } catch (error) {
          job.done.delete(chunkIndex);
          throw error;
        }
        return true;
      });
    } catch (error) {
      job.done.delete(chunkIndex);
      job.busy.delete(chunkIndex);
      await this.failJob(job, `storing chunk ${chunkIndex} failed: ${error instanceof Error ? error.message : String(error)}`);
      return;
    }
    job.busy.delete(chunkIndex);
    if (stored) {
      job.sessionUnits += chunk.units;
      job.unitsDone += chunk.units;
      this.emit('progress', { jobId: job.id, unitsDone: job.unitsDone, total: job.total });
      if (job.done.size === job.plan.length) this.afterEnd(job, 'done');
    }
    void this.pump();
  }


  private async finishIfComplete(job: ActiveJob): Promise<void> {
    const finished = await inSyncTransaction(this.db, (db) => {
      const current = db.prepare(`SELECT "state" FROM "jobs" WHERE "id" = ?`).get(job.id) as { state: JobState } | undefined;
      if (!current || current.state !== 'running') return false;
      completeJobRow(db, job);
      return true;
    });
    if (finished) this.afterEnd(job, 'done');
  }


  private async failJob(job: ActiveJob, reason: string): Promise<void> {
    if (job.ended) return;
    const failed = await inSyncTransaction(this.db, (db) => endJobRow(db, job.id, 'failed', reason));
    this.report(`jobs: job ${job.id} failed: ${reason}`);
    if (failed) await this.abandon(job.id, 'failed');
    else void this.pump();
  }

  /** Stops the in-flight chunks of an ended job and forgets it. */
  private async abandon(jobId: number, state: JobState): Promise<void> {
    const job = this.active.get(jobId);
    if (job) this.afterEnd(job, state);
    else this.settle(jobId, state);
    await this.backend.dropJob(jobId);
    void this.pump();
  }

  private afterEnd(job: ActiveJob, state: JobState): void {
    job.ended = true;
    this.active.delete(job.id);
    if (state === 'done') this.backend.forgetJob(job.id);
    this.settle(job.id, state);
  }

  private settle(jobId: number, state: JobState): void {
    this.emit('ended', { jobId, state });
    const list = this.waiters.get(jobId);
    this.waiters.delete(jobId);
    for (const resolve of list ?? []) resolve(state);
  }


  private async onLost(task: ChunkTask | null, reason: string): Promise<void> {
    if (this.stopped) return;
    if (task) {
      const job = this.active.get(task.jobId);
      if (job && !job.ended) {
        job.busy.delete(task.chunkIndex);
        const tries = (job.retries.get(task.chunkIndex) ?? 0) + 1;
        job.retries.set(task.chunkIndex, tries);
        if (tries > this.maxChunkRetries) {
          await this.failJob(job, `chunk ${task.chunkIndex} lost its worker ${tries} times`);
          return;
        }
        await inSyncTransaction(this.db, (db) =>
          appendLog(db, job.id, `${reason} during chunk ${task.chunkIndex}; computing it again (try ${tries + 1})`),
        ).catch(() => undefined);
      }
    }
    void this.pump();
  }

  private scheduleIdleShutdown(): void {
    if (this.stopped) return;
    if (this.active.size > 0 || this.backend.inFlight().length > 0) return;
    this.backend.idle();
  }
}
