/**
 * The distributed backend end to end: Debian's redis-server on a loopback port, two worker processes
 * (`server/jobs/remote/workerMain.ts`, as `npm run worker` starts them), a real simulation batch queued
 * by the batch service. One worker process is killed with SIGKILL mid-batch (a host lost): the batch
 * completes, every chunk is stored once, and the stored results equal, byte for byte, the same batch
 * (same seed) run by the embedded worker threads and the single-thread reference (runChunk called
 * chunk by chunk here). The reference is the worker module itself, outside both backends; the
 * property checked (results independent of scheduling) is common practice for seeded parallel
 * simulation (one random stream per chain from the batch seed, see server/engine/prng.ts).
 * Skipped, with a line saying so, when /usr/bin/redis-server is missing (scripts/test.sh installs it).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { QueueEvents } from 'bullmq';
import IORedis from 'ioredis';
import type { DataSource } from 'typeorm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadBatchContext, planBatchChunks } from '../../server/batches/jobKind';
import { createBatch } from '../../server/batches/service';
import { runChunk } from '../../server/batches/worker';
import { openDataSource } from '../../server/db/dataSource';
import { seedDemo } from '../../server/demo/seed';
import { BullmqBackend, jobQueueFor, stopJobQueue, syncDb } from '../../server/jobs';
import type { ParsedCreateBatchBody } from '../../shared/batches';
import { AUX_STATISTIC_IDS } from '../../shared/auxStatistics';
import { hasRedis, startCluster, type Cluster } from './fixtures/cluster';
import request from 'supertest';
import { bearer, makeTestApp, STATS } from '../api/helpers';

const MODEL = {
  rates: [2.5, 2.5],
  effects: [
    { id: 'density' as const, value: -2.2 },
    { id: 'reciprocity' as const, value: 1.6 },
    { id: 'transitive_triplets' as const, value: 0.3 },
    { id: 'same_covariate' as const, covariate: 'watch', value: 0.9 },
  ],
};
const CHAINS = 600;
const SEED = 4242;
const body = (): ParsedCreateBatchBody => ({ model: MODEL, chains: CHAINS, seed: SEED, statistics: [...AUX_STATISTIC_IDS] });

function stored(ds: DataSource, batchId: number) {
  const db = syncDb(ds);
  const blocks = new Map<string, string>();
  for (const r of db.prepare(`SELECT "period", "chunkIndex", "data" FROM "batch_results" WHERE "batchId" = ?`).all(batchId) as { period: number; chunkIndex: number; data: Buffer }[]) {
    blocks.set(`${r.period}:${r.chunkIndex}`, r.data.toString('base64'));
  }
  const counts = new Map<number, string>();
  for (const r of db.prepare(`SELECT "period", "counts", "networks" FROM "batch_tie_counts" WHERE "batchId" = ?`).all(batchId) as { period: number; counts: Buffer; networks: number }[]) {
    counts.set(r.period, `${r.networks}:${r.counts.toString('base64')}`);
  }
  return { blocks, counts };
}

const jobOf = async (ds: DataSource, batchId: number): Promise<number> => (await ds.query(`SELECT "jobId" FROM "batches" WHERE "id" = ?`, [batchId]))[0].jobId;

if (!hasRedis()) console.log('distributed backend test skipped: /usr/bin/redis-server is missing (apt-get install -y redis-server)');

describe.skipIf(!hasRedis())('distributed backend: BullMQ on Redis, worker processes', () => {
  let dir: string;
  let ds: DataSource;
  let studyId: number;
  let userId: number;
  let cluster: Cluster;
  const queueName = `wavefit-test-${process.pid}`;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'wavefit-distributed-'));
    ds = await openDataSource({ database: join(dir, 'api.sqlite') });
    const seed = await seedDemo(ds, { passwordHash: { memoryCost: 1024, timeCost: 1, parallelism: 1 } });
    studyId = seed.studyId;
    userId = (await ds.query(`SELECT "id" FROM "users" LIMIT 1`))[0].id;
    cluster = await startCluster(queueName);
  }, 120_000);

  afterAll(async () => {
    await stopJobQueue(ds).catch(() => undefined);
    await cluster?.stop();
    await ds?.destroy();
    rmSync(dir, { recursive: true, force: true });
  }, 60_000);

  it('two workers, one killed mid-batch: the batch completes, nothing lost, results equal the embedded run and the reference', async () => {
    // 1. The embedded run (worker threads of this process).
    const embeddedQueue = jobQueueFor(ds, { workers: 2 });
    expect(embeddedQueue.backend.name).toBe('threads');
    const embeddedBatch = await createBatch(ds, { studyId, userId, body: body() });
    expect(await embeddedQueue.whenSettled(await jobOf(ds, embeddedBatch))).toBe('done');
    await stopJobQueue(ds);

    // 2. The same batch through Redis, with two worker processes of one thread each.
    const [first, second] = await Promise.all([
      cluster.startWorker(1, { WAVEFIT_LOCK_MS: '2000' }),
      cluster.startWorker(1, { WAVEFIT_LOCK_MS: '2000' }),
    ]);
    const watcherRedis = new IORedis(cluster.url, { maxRetriesPerRequest: null });
    const watcher = new QueueEvents(queueName, { connection: watcherRedis });
    await watcher.waitUntilReady();
    let stalled = 0;
    watcher.on('stalled', () => stalled++);

    const queue = jobQueueFor(ds, { backend: new BullmqBackend({ url: cluster.url, queueName }) });
    expect(queue.backend.name).toBe('bullmq');
    const remoteBatch = await createBatch(ds, { studyId, userId, body: body() });
    const jobId = await jobOf(ds, remoteBatch);
    // After the third stored chunk both workers hold a chunk: kill the first one (SIGKILL, no goodbye).
    let storedChunks = 0;
    let killed: Promise<void> | null = null;
    const onProgress = () => {
      if (++storedChunks === 3) killed = cluster.kill(first);
    };
    queue.on('progress', onProgress);
    expect(await queue.whenSettled(jobId)).toBe('done');
    queue.off('progress', onProgress);
    expect(killed).not.toBeNull();
    await killed;
    expect(first.signalCode).toBe('SIGKILL');
    expect(second.exitCode).toBeNull(); // the survivor did the rest
    // The killed worker's chunk was found stalled and computed again by the other one.
    expect(stalled).toBeGreaterThanOrEqual(1);
    await watcher.close();
    watcherRedis.disconnect();
    await stopJobQueue(ds);

    // 3. Nothing lost: one stored chunk row per planned chunk, the job's counters complete.
    const plan = planBatchChunks({ batchId: remoteBatch, chains: CHAINS, periods: 2 });
    const chunkRows = syncDb(ds).prepare(`SELECT COUNT(*) AS n, COUNT(DISTINCT "chunkIndex") AS d FROM "job_chunks" WHERE "jobId" = ?`).get(jobId) as { n: number; d: number };
    expect(chunkRows).toEqual({ n: plan.length, d: plan.length });
    const job = syncDb(ds).prepare(`SELECT "progressDone", "progressTotal", "chunksDone", "chunksTotal", "log" FROM "jobs" WHERE "id" = ?`).get(jobId) as Record<string, unknown>;
    expect(job.progressDone).toBe(job.progressTotal);
    expect(job.chunksDone).toBe(plan.length);
    expect(String(job.log)).toMatch(/remote workers \(BullMQ/);

    // 4. Same seed, same results: remote == embedded == the single-thread reference.
    const remote = stored(ds, remoteBatch);
    const embedded = stored(ds, embeddedBatch);
    expect(remote.blocks.size).toBe(2 * plan.length);
    expect(remote.blocks).toEqual(embedded.blocks);
    expect(remote.counts).toEqual(embedded.counts);
    const context = await loadBatchContext(ds, remoteBatch);
    for (const index of [0, Math.floor(plan.length / 2), plan.length - 1]) {
      const result = runChunk(context, plan[index].chunk);
      for (const per of result.periods) {
        expect(remote.blocks.get(`${per.period}:${index}`)).toBe(Buffer.from(per.rows.buffer, per.rows.byteOffset, per.rows.byteLength).toString('base64'));
      }
    }
  }, 240_000);

  it('an error thrown by runChunk on a remote worker fails the job with its message', async () => {
    await cluster.startWorker(1);
    const queue = jobQueueFor(ds, { backend: new BullmqBackend({ url: cluster.url, queueName }) });
    // A job of the test fixture kind whose chunk throws (tests/jobs/fixtures/sumKind.ts).
    await import('./fixtures/sumKind');
    await queue.start();
    const jobId = await queue.enqueue('test-sum', { chunks: 4, unitsPerChunk: 3, seed: 7, failChunk: 2 });
    expect(await queue.whenSettled(jobId)).toBe('failed');
    expect(queue.status(jobId)!.error).toMatch(/chunk 2 failed: test-sum: this chunk fails on purpose/);
    await stopJobQueue(ds);
  }, 120_000);

  it('a fit runs on a remote worker through the API and gives the same estimates as the embedded threads with the same seed', async () => {
    const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
    const fitWith = async (remote: boolean) => {
      const t = await makeTestApp();
      try {
        if (remote) jobQueueFor(t.dataSource, { backend: new BullmqBackend({ url: cluster.url, queueName }) });
        else jobQueueFor(t.dataSource, { workers: 1 });
        const stats = await t.tokenFor(STATS);
        const base = `/api/studies/${t.seed.studyId}/models`;
        const model = await request(t.app).post(base).set(bearer(stats)).send({
          name: 'Remote fit',
          description: '',
          rates: [{ period: 1, estimate: true }, { period: 2, estimate: true }],
          effects: [{ id: 'density', estimate: true }, { id: 'reciprocity', estimate: true }],
        });
        expect(model.status).toBe(201);
        const start = await request(t.app).post(`${base}/${model.body.model.id}/fits`).set(bearer(stats)).send({ seed: 515, phase3Runs: 100 });
        expect(start.status).toBe(201);
        let fit = start.body.fit;
        for (let i = 0; i < 2400 && !['done', 'failed', 'cancelled'].includes(fit.state); i++) {
          await sleep(50);
          fit = (await request(t.app).get(`${base}/${model.body.model.id}/fits/${fit.id}`).set(bearer(stats))).body.fit;
        }
        expect(fit.state).toBe('done');
        const [job] = await t.dataSource.query(`SELECT "log" FROM "jobs" WHERE "id" = (SELECT "jobId" FROM "fits" WHERE "id" = ?)`, [fit.id]);
        expect(String(job.log)).toMatch(remote ? /remote workers \(BullMQ/ : /started with 1 worker/);
        return fit.results;
      } finally {
        await stopJobQueue(t.dataSource);
        await t.close();
      }
    };
    const worker = await cluster.startWorker(1);
    const embedded = await fitWith(false);
    const remote = await fitWith(true);
    await cluster.kill(worker);
    expect(remote.parameters.length).toBe(4);
    // Everything but the wall-clock seconds the fit took.
    expect({ ...remote, seconds: 0 }).toEqual({ ...embedded, seconds: 0 });
    expect(remote.seconds).toBeGreaterThan(0);
  }, 240_000);
});
