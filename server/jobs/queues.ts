/** One job queue per data source: created on first use, started at boot, stopped with the app. */
import type { DataSource } from 'typeorm';
import { inSyncTransactionNow, syncDb } from '../db/sync';
import type { ChunkBackend } from './backend';
import { JobQueue, type JobQueueOptions } from './queue';
import { BullmqBackend } from './remote/bullmq';
import { createJobRow } from './rows';

/**
 * The backend the configuration asks for: BullMQ on Redis when REDIS_URL is set (chunks computed by
 * `npm run worker` processes), else undefined (the queue's own worker threads).
 */
export function backendFromEnv(env: Record<string, string | undefined> = process.env): ChunkBackend | undefined {
  return env.REDIS_URL ? new BullmqBackend({ url: env.REDIS_URL }) : undefined;
}

const queues = new WeakMap<DataSource, JobQueue>();

/**
 * The queue of a data source (created on first use, not started). Routes call this to enqueue; the
 * server's main.ts calls `startJobQueue` at boot so unfinished jobs resume.
 */
export function jobQueueFor(dataSource: DataSource, options?: JobQueueOptions): JobQueue {
  let queue = queues.get(dataSource);
  if (!queue) {
    queue = new JobQueue(dataSource, { ...options, backend: options?.backend ?? backendFromEnv() });
    queues.set(dataSource, queue);
  }
  return queue;
}

/** Creates (if needed) and starts the queue of a data source; resumes unfinished jobs. */
export async function startJobQueue(dataSource: DataSource, options?: JobQueueOptions): Promise<JobQueue> {
  const queue = jobQueueFor(dataSource, options);
  await queue.start();
  return queue;
}

/** Stops the queue of a data source (workers terminated; unfinished jobs resume at the next start). */
export async function stopJobQueue(dataSource: DataSource): Promise<void> {
  const queue = queues.get(dataSource);
  if (queue) {
    await queue.stop();
    queues.delete(dataSource);
  }
}

/** Synchronous form of createJobRow in its own transaction (for scripts). */
export function enqueueNow(dataSource: DataSource, kind: string, payload: unknown): number {
  return inSyncTransactionNow(syncDb(dataSource), (db) => createJobRow(db, kind, payload));
}
