/**
 * Where chunks run: the one small interface between the job queue (./queue.ts, which keeps every job,
 * chunk and result in the database of the API process) and the machinery that computes chunks.
 *
 * Two backends implement it: `ThreadBackend` (./threads.ts, worker threads in this process, the embedded
 * default) and `BullmqBackend` (./remote/bullmq.ts, chunks as BullMQ jobs on Redis, computed by
 * `npm run worker` processes on any host). Services never see it: they call the queue, and the queue
 * picks the backend from the configuration (REDIS_URL). A job kind works on both unchanged, because
 * a backend only moves the kind's context, chunk and result, and runs the kind's `runChunk`.
 */

/** One chunk handed to a backend. */
export interface ChunkTask {
  /** Unique within the queue's process. */
  taskId: number;
  jobId: number;
  chunkIndex: number;
  units: number;
  /** Units of this chunk done so far (moved by the backend as it hears progress). */
  liveUnits: number;
  /** The kind's worker module (absolute path). */
  modulePath: string;
  /** The job's context (same object for every chunk of the job; a backend sends it once per worker/host). */
  context: unknown;
  chunk: unknown;
}

/** What a backend tells the queue. */
export interface ChunkBackendEvents {
  /** The chunk's result, ready to store. */
  result(task: ChunkTask, result: unknown, workMs: number): void;
  /** `runChunk` threw (or the chunk could not be run after its retries): the job fails with this message. */
  error(task: ChunkTask, message: string): void;
  /**
   * The worker died while computing the chunk and the backend does not retry by itself: the queue
   * computes it again (at most its retry limit). A backend that retries by itself never calls this.
   */
  lost(task: ChunkTask | null, reason: string): void;
  /** A line for the job's log. */
  log(task: ChunkTask, line: string): void;
  /** A line for the queue's own report. */
  report(line: string): void;
}

export interface ChunkBackend {
  /** For the job log: "threads" or "bullmq". */
  readonly name: string;
  /** How many chunks may be in flight at once (the queue fills up to this). */
  readonly capacity: number;
  /** Worker count for the job log ("started with N worker(s)"); remote backends say what they know. */
  readonly workersLabel: string;
  /** Connect (remote backends); called by the queue's start(). */
  start(events: ChunkBackendEvents): Promise<void>;
  /** Run one chunk; answers through the events. */
  run(task: ChunkTask): void;
  /** Chunks in flight (for live progress). */
  inFlight(): ChunkTask[];
  /** The job ended (done): forget its context. */
  forgetJob(jobId: number): void;
  /** The job failed or was cancelled: stop its chunks in flight (their results are dropped) and forget it. */
  dropJob(jobId: number): Promise<void>;
  /** No job is active: a backend may release idle resources after a while. */
  idle(): void;
  /** Stop everything (chunks in flight are lost; the queue computes them again at its next start). */
  stop(): Promise<void>;
  /** Live local workers (0 for remote backends). */
  readonly live: number;
  /** Durability tests: make one busy worker die as if it had crashed. */
  crashOneForTest(): { jobId: number; chunkIndex: number } | null;
}
