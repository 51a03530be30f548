/**
 * `npm run worker`: a worker process for the distributed backend (./bullmq.ts). Runs on any host that
 * reaches Redis and has the project's code (and node_modules); needs no database.
 *
 *   REDIS_URL=redis://queue-host:6379 WAVEFIT_WORKERS=4 npm run worker
 *
 * It takes chunk jobs from the BullMQ queue and computes each in one of its worker threads (the same
 * threads and the same runChunk modules as the embedded backend, ../pool.ts and ../worker.ts), so the
 * main thread stays free to renew BullMQ's lock while a chunk computes. Settings: REDIS_URL (required),
 * WAVEFIT_WORKERS (threads, default the number of cores), WAVEFIT_QUEUE (default "wavefit-chunks"),
 * WAVEFIT_LOCK_MS (how long a chunk stays claimed without a sign of life, default 30000: after that a
 * chunk of a dead worker is taken by another), WAVEFIT_STALLED_RETRIES (default 3).
 * SIGTERM or SIGINT: finishes the chunks in hand, then exits.
 */
import { UnrecoverableError, Worker, type Job } from 'bullmq';
import IORedis from 'ioredis';
import { WorkerPool, type Slot } from '../pool';
import type { FromWorker } from '../protocol';
import { defaultWorkerCount } from '../queue';
import { decode, decodeBytes, encode, localModulePath, queueNameFromEnv, type ChunkJobData, type ChunkJobResult } from './codec';
import { workerName } from './bullmq';

interface Pending {
  resolve(answer: { result: unknown; workMs: number }): void;
  reject(error: Error): void;
  job: Job<ChunkJobData>;
}

function positive(env: Record<string, string | undefined>, name: string, fallback: number): number {
  const raw = env[name];
  if (raw == null || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1) throw new Error(`worker: ${name} must be a positive whole number, got "${raw}"`);
  return n;
}

export async function startRemoteWorker(env: Record<string, string | undefined> = process.env): Promise<{ close(): Promise<void> }> {
  const url = env.REDIS_URL;
  if (!url) throw new Error('worker: REDIS_URL is not set (e.g. REDIS_URL=redis://127.0.0.1:6379)');
  const threads = defaultWorkerCount(env);
  const lockDuration = positive(env, 'WAVEFIT_LOCK_MS', 30_000);
  const maxStalledCount = positive(env, 'WAVEFIT_STALLED_RETRIES', 3);
  const queueName = queueNameFromEnv(env);
  const name = workerName();

  const pending = new Map<number, Pending>();
  let nextTaskId = 1;
  const pool = new WorkerPool(threads, {
    message: (slot, message) => onMessage(slot, message),
    exit: (slot, code) => {
      pool.vacate(slot);
      const task = slot.task;
      slot.task = null;
      if (!task) return;
      const p = pending.get(task.taskId);
      pending.delete(task.taskId);
      p?.reject(new Error(`worker thread stopped unexpectedly (exit code ${code}) on ${name}`));
    },
    report: (line) => console.error(line),
  });
  function onMessage(slot: Slot, message: FromWorker): void {
    if (message.type === 'ready') return;
    const p = pending.get(message.taskId);
    if (!p) return;
    if (message.type === 'progress') {
      void p.job.updateProgress({ units: message.unitsDone }).catch(() => undefined);
      return;
    }
    if (message.type === 'log') {
      void p.job.updateProgress({ log: message.line }).catch(() => undefined);
      return;
    }
    pending.delete(message.taskId);
    pool.releaseSlot(slot);
    if (message.type === 'error') p.reject(new UnrecoverableError(message.message));
    else p.resolve({ result: message.result, workMs: message.workMs });
  }

  const redis = new IORedis(url, { maxRetriesPerRequest: null });
  // Contexts by key, with a small number in each thread; a numeric id per key for the thread protocol.
  const contexts = new Map<string, Promise<{ id: number; modulePath: string; context: unknown }>>();
  let nextContextId = 1;
  function contextFor(key: string) {
    let entry = contexts.get(key);
    if (!entry) {
      entry = redis.getBuffer(key).then((bytes) => {
        if (!bytes) throw new Error(`the job's context ${key} is not in Redis (the job ended or expired)`);
        const { modulePath, context } = decodeBytes(bytes) as { modulePath: string; context: unknown };
        return { id: nextContextId++, modulePath: localModulePath(modulePath), context };
      });
      contexts.set(key, entry);
      entry.catch(() => contexts.delete(key));
      // Keep the latest few contexts only.
      while (contexts.size > 8) {
        const oldest = contexts.keys().next().value as string;
        const old = contexts.get(oldest)!;
        contexts.delete(oldest);
        void old.then(({ id }) => {
          for (const slot of pool.slots) if (slot?.contexts.has(id)) { pool.post(slot, { type: 'forget', jobId: id }); slot.contexts.delete(id); }
        }).catch(() => undefined);
      }
    }
    return entry;
  }

  const processor = async (job: Job<ChunkJobData>): Promise<ChunkJobResult> => {
    let ctx;
    try {
      ctx = await contextFor(job.data.contextKey);
    } catch (error) {
      throw new UnrecoverableError(error instanceof Error ? error.message : String(error));
    }
    const slot = pool.idleSlot();
    if (!slot) throw new Error(`no idle worker thread on ${name}`);
    if (!slot.contexts.has(ctx.id)) {
      pool.post(slot, { type: 'context', jobId: ctx.id, modulePath: ctx.modulePath, context: ctx.context });
      slot.contexts.add(ctx.id);
    }
    const taskId = nextTaskId++;
    slot.task = { taskId, jobId: ctx.id, chunkIndex: job.data.chunkIndex, units: job.data.units, liveUnits: 0 };
    slot.worker.ref();
    const answer = await new Promise<{ result: unknown; workMs: number }>((resolve, reject) => {
      pending.set(taskId, { resolve, reject, job });
      pool.post(slot, { type: 'run', taskId, jobId: ctx.id, chunkIndex: job.data.chunkIndex, chunk: decode(job.data.chunk) });
    });
    return { result: encode(answer.result), workMs: answer.workMs, worker: name };
  };

  const worker = new Worker<ChunkJobData, ChunkJobResult>(queueName, processor, {
    connection: new IORedis(url, { maxRetriesPerRequest: null }),
    concurrency: threads,
    lockDuration,
    stalledInterval: Math.max(500, Math.floor(lockDuration / 2)),
    maxStalledCount,
  });
  worker.on('error', (error) => console.error(`worker: ${error.message}`));
  await worker.waitUntilReady();
  console.log(`wavefit worker ${name}: ${threads} thread(s) on queue "${queueName}" at ${url.replace(/\/\/[^@]*@/, '//***@')}`);

  return {
    async close() {
      await worker.close();
      await Promise.all(pool.slots.map((slot) => (slot ? pool.stopSlot(slot) : undefined)));
      redis.disconnect();
    },
  };
}

if (require.main === module) {
  startRemoteWorker()
    .then((handle) => {
      let closing = false;
      const shutdown = () => {
        if (closing) return;
        closing = true;
        void handle.close().then(() => process.exit(0));
      };
      process.on('SIGTERM', shutdown);
      process.on('SIGINT', shutdown);
    })
    .catch((error: unknown) => {
      console.error(error instanceof Error ? error.message : String(error));
      process.exit(1);
    });
}
