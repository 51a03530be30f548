/**
 * The distributed backend: every chunk is one BullMQ job on Redis, computed by `npm run worker`
 * processes on any host that reaches Redis and has the code (./workerMain.ts). The API process keeps
 * the durable record (jobs, job_chunks and the kinds' own rows) and stores each result as it arrives,
 * exactly as with the embedded threads, so the stored data do not depend on where chunks ran.
 *
 * - The job's context goes once into a Redis key (V8 serialisation); every chunk job names the key.
 * - Retries are BullMQ's: a worker process that dies leaves its chunk "stalled" and another worker takes
 *   it again (up to `maxStalledCount`); a worker thread that dies fails the attempt, retried up to
 *   `attempts`. An error thrown by runChunk is final (UnrecoverableError) and fails the job, as embedded.
 * - Results come back in the "completed" event of the queue's event stream (compact: V8 bytes, base64).
 * - A cancelled or failed job: its waiting chunk jobs are removed, results of running ones are dropped.
 * - After an API restart the queue submits the open chunks again under new ids; answers to the old ids
 *   are ignored, and a chunk stored twice is refused by the queue (one job_chunks row per chunk).
 */
import { randomUUID } from 'node:crypto';
import { hostname } from 'node:os';
import { Queue, QueueEvents } from 'bullmq';
import IORedis from 'ioredis';
import type { ChunkBackend, ChunkBackendEvents, ChunkTask } from '../backend';
import { decode, encode, encodeBytes, portableModulePath, queueNameFromEnv, type ChunkJobData, type ChunkJobProgress, type ChunkJobResult } from './codec';

export interface BullmqBackendOptions {
  /** redis://host:port/db */
  url: string;
  /** Queue name (default WAVEFIT_QUEUE or "wavefit-chunks"); API and workers must agree. */
  queueName?: string;
  /** Chunk jobs in Redis at once (default 256). */
  capacity?: number;
  /** Attempts per chunk when a worker thread dies (default 3). */
  attempts?: number;
  /** Seconds a context key lives in Redis (default one day; deleted when the job ends). */
  contextTtlSeconds?: number;
}

export class BullmqBackend implements ChunkBackend {
  readonly name = 'bullmq';
  readonly capacity: number;
  readonly workersLabel: string;
  readonly live = 0;
  readonly queueName: string;
  private readonly url: string;
  private readonly attempts: number;
  private readonly contextTtl: number;
  private readonly session = randomUUID().slice(0, 12);
  private events: ChunkBackendEvents | null = null;
  private queue: Queue | null = null;
  private queueEvents: QueueEvents | null = null;
  private redis: IORedis | null = null;
  private eventsRedis: IORedis | null = null;
  private starting: Promise<void> | null = null;
  /** BullMQ job id -> chunk. */
  private readonly tasks = new Map<string, ChunkTask>();
  /** Job id -> its context key, once written. */
  private readonly contexts = new Map<number, Promise<string>>();

  constructor(options: BullmqBackendOptions) {
    this.url = options.url;
    this.queueName = options.queueName ?? queueNameFromEnv();
    this.capacity = options.capacity ?? 256;
    this.attempts = options.attempts ?? 3;
    this.contextTtl = options.contextTtlSeconds ?? 86_400;
    this.workersLabel = `remote workers (BullMQ queue "${this.queueName}" on Redis)`;
  }

  start(events: ChunkBackendEvents): Promise<void> {
    this.events = events;
    if (!this.starting) this.starting = this.connect();
    return this.starting;
  }

  private async connect(): Promise<void> {
    // BullMQ needs maxRetriesPerRequest null on connections that block (the event stream reader).
    this.redis = new IORedis(this.url, { maxRetriesPerRequest: null });
    this.queue = new Queue(this.queueName, { connection: this.redis });
    this.eventsRedis = new IORedis(this.url, { maxRetriesPerRequest: null });
    this.queueEvents = new QueueEvents(this.queueName, { connection: this.eventsRedis });
    this.queueEvents.on('completed', ({ jobId, returnvalue }) => this.onCompleted(jobId, returnvalue as unknown));
    this.queueEvents.on('failed', ({ jobId, failedReason }) => this.onFailed(jobId, failedReason));
    this.queueEvents.on('progress', ({ jobId, data }) => this.onProgress(jobId, data as unknown));
    this.queueEvents.on('error', (error) => this.events?.report(`jobs: redis event stream: ${error.message}`));
    this.queue.on('error', (error) => this.events?.report(`jobs: redis queue: ${error.message}`));
    await this.queueEvents.waitUntilReady();
    await this.queue.waitUntilReady();
  }

  run(task: ChunkTask): void {
    const id = `${this.session}-${task.taskId}`;
    this.tasks.set(id, task);
    void (async () => {
      await this.starting;
      const contextKey = await this.contextKeyFor(task);
      const data: ChunkJobData = { contextKey, jobId: task.jobId, chunkIndex: task.chunkIndex, units: task.units, chunk: encode(task.chunk) };
      await this.queue!.add('chunk', data, {
        jobId: id,
        attempts: this.attempts,
        backoff: { type: 'fixed', delay: 200 },
        removeOnComplete: true,
        removeOnFail: { count: 1000 },
      });
    })().catch((error: unknown) => {
      if (!this.tasks.delete(id)) return;
      this.events?.error(task, `could not queue the chunk on Redis: ${error instanceof Error ? error.message : String(error)}`);
    });
  }

  private contextKeyFor(task: ChunkTask): Promise<string> {
    let key = this.contexts.get(task.jobId);
    if (!key) {
      const name = `wavefit:context:${this.queueName}:${this.session}:${task.jobId}`;
      key = this.redis!.set(name, encodeBytes({ modulePath: portableModulePath(task.modulePath), context: task.context }), 'EX', this.contextTtl).then(() => name);
      this.contexts.set(task.jobId, key);
      key.catch(() => this.contexts.delete(task.jobId));
    }
    return key;
  }

  private onCompleted(id: string, returnvalue: unknown): void {
    const task = this.tasks.get(id);
    if (!task) return; // another session's chunk, or one of a job that ended
    this.tasks.delete(id);
    let result: unknown;
    let answer: ChunkJobResult;
    try {
      answer = (typeof returnvalue === 'string' ? JSON.parse(returnvalue) : returnvalue) as ChunkJobResult;
      result = decode(answer.result);
    } catch (error) {
      this.events?.error(task, `the worker's answer could not be read: ${error instanceof Error ? error.message : String(error)}`);
      return;
    }
    this.events?.result(task, result, answer.workMs);
  }

  private onFailed(id: string, reason: string): void {
    const task = this.tasks.get(id);
    if (!task) return;
    this.tasks.delete(id);
    this.events?.error(task, reason);
  }

  private onProgress(id: string, data: unknown): void {
    const task = this.tasks.get(id);
    if (!task || data === null || typeof data !== 'object') return;
    const progress = data as ChunkJobProgress;
    if (typeof progress.units === 'number') task.liveUnits = progress.units;
    if (typeof progress.log === 'string') this.events?.log(task, progress.log);
  }

  inFlight(): ChunkTask[] {
    return [...this.tasks.values()];
  }

  forgetJob(jobId: number): void {
    void this.deleteContext(jobId);
  }

  async dropJob(jobId: number): Promise<void> {
    const removals: Promise<unknown>[] = [];
    for (const [id, task] of this.tasks) {
      if (task.jobId !== jobId) continue;
      this.tasks.delete(id);
      // A waiting chunk job is removed; a running one is locked and runs to its end (its answer is dropped).
      if (this.queue) removals.push(this.queue.remove(id).catch(() => 0));
    }
    await Promise.all(removals);
    await this.deleteContext(jobId);
  }

  private async deleteContext(jobId: number): Promise<void> {
    const key = this.contexts.get(jobId);
    this.contexts.delete(jobId);
    if (!key || !this.redis) return;
    await key.then((name) => this.redis?.del(name)).catch(() => undefined);
  }

  idle(): void {}

  async stop(): Promise<void> {
    const queue = this.queue;
    const removals = queue ? [...this.tasks.keys()].map((id) => queue.remove(id).catch(() => 0)) : [];
    await Promise.all(removals);
    this.tasks.clear();
    for (const jobId of [...this.contexts.keys()]) await this.deleteContext(jobId);
    const closing: Promise<unknown>[] = [];
    if (this.queueEvents) closing.push(this.queueEvents.close());
    if (queue) closing.push(queue.close());
    await Promise.all(closing).catch(() => undefined);
    this.eventsRedis?.disconnect();
    this.redis?.disconnect();
    this.eventsRedis = null;
    this.queue = null;
    this.queueEvents = null;
    this.redis = null;
    this.starting = null;
  }

  crashOneForTest(): null {
    // Remote workers are processes on other hosts; tests kill them directly.
    return null;
  }
}

/** The worker's name in logs: host and process id. */
export const workerName = (): string => `${hostname()}:${process.pid}`;
