/**
 * Benchmark of the distributed job backend: the batch of bench/batches.ts (here 4000 chains, 50 actors, six
 * effects, all auxiliary statistics) through BullMQ on a private Debian redis-server, computed by 1, 2
 * and 4 worker processes (`npm run worker`, one thread each), against the embedded backend with 2
 * threads. Prints chains per second, the API process's CPU time (storing results, Redis traffic) and
 * whether every run stored identical results. Skipped with a line when redis-server is missing.
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { createBatch } from '../server/batches/service';
import { openDataSource } from '../server/db/dataSource';
import { BullmqBackend, jobQueueFor, stopJobQueue, syncDb, type JobQueueOptions } from '../server/jobs';
import { hasRedis, startCluster } from '../tests/jobs/fixtures/cluster';
import { body as benchBody, makeStudy } from './batches';
import type { BenchSection } from './engine';

const CHAINS = 4000;
const fmt = (x: number, d = 1) => x.toFixed(d);

function digest(ds: DataSource, batchId: number): string {
  const h = createHash('sha256');
  for (const r of syncDb(ds).prepare(`SELECT "period", "chunkIndex", "data" FROM "batch_results" WHERE "batchId" = ? ORDER BY "period", "chunkIndex"`).all(batchId) as { data: Buffer }[]) h.update(r.data);
  return h.digest('hex').slice(0, 12);
}

async function timed(ds: DataSource, ids: { studyId: number; userId: number }, options: JobQueueOptions, chains: number) {
  const queue = jobQueueFor(ds, options);
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const batchId = await createBatch(ds, { ...ids, body: benchBody(chains, 777) });
  const [{ jobId }] = await ds.query(`SELECT "jobId" FROM "batches" WHERE "id" = ?`, [batchId]);
  const state = await queue.whenSettled(jobId);
  if (state !== 'done') throw new Error(`bench: batch ${batchId} ended ${state}: ${queue.status(jobId)?.error}`);
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  return { ms, batchId, apiCpuMs: (cpu.user + cpu.system) / 1000 };
}

const section: BenchSection = {
  name: `distributed backend: ${CHAINS} chains through BullMQ on Redis, 1, 2 and 4 worker processes`,
  async run(print) {
    if (!hasRedis()) {
      print('skipped: /usr/bin/redis-server is missing (apt-get install -y redis-server)');
      return;
    }
    print(`${availableParallelism()} cores; load average before: ${loadavg().map((x) => x.toFixed(2)).join(', ')}`);
    const dir = mkdtempSync(join(tmpdir(), 'wavefit-bench-dist-'));
    const ds = await openDataSource({ database: join(dir, 'bench.sqlite') });
    const queueName = `wavefit-bench-${process.pid}`;
    const cluster = await startCluster(queueName);
    const digests = new Set<string>();
    try {
      const ids = await makeStudy(ds);
      await timed(ds, ids, { workers: 2 }, 100); // warm the threads
      const embedded = await timed(ds, ids, { workers: 2 }, CHAINS);
      await stopJobQueue(ds);
      digests.add(digest(ds, embedded.batchId));
      print(`embedded, 2 threads: ${fmt(embedded.ms / 1000, 2)} s, ${fmt(CHAINS / (embedded.ms / 1000), 0)} chains/s, API process CPU ${fmt(embedded.apiCpuMs / 1000, 2)} s (includes the threads)`);
      for (const n of [1, 2, 4]) {
        const workers = await Promise.all(Array.from({ length: n }, () => cluster.startWorker(1)));
        const options = { backend: new BullmqBackend({ url: cluster.url, queueName }) };
        await timed(ds, ids, options, 20 * n); // every worker loads its thread and the context once
        const run = await timed(ds, ids, options, CHAINS);
        await stopJobQueue(ds);
        digests.add(digest(ds, run.batchId));
        print(
          `BullMQ, ${n} worker process${n > 1 ? 'es' : ''}: ${fmt(run.ms / 1000, 2)} s, ${fmt(CHAINS / (run.ms / 1000), 0)} chains/s, ` +
            `${fmt(embedded.ms / run.ms, 2)}x the embedded run; API process CPU ${fmt(run.apiCpuMs / 1000, 2)} s (${fmt((100 * run.apiCpuMs) / run.ms, 0)}% of one core)`,
        );
        for (const w of workers) await cluster.kill(w);
      }
      print(`stored results identical in every run: ${digests.size === 1 ? 'yes' : `NO (${[...digests].join(', ')})`}`);
      print(`load average after: ${loadavg().map((x) => x.toFixed(2)).join(', ')}`);
    } finally {
      await stopJobQueue(ds).catch(() => undefined);
      await cluster.stop();
      await ds.destroy();
      rmSync(dir, { recursive: true, force: true });
    }
  },
};

export const distributedSections: BenchSection[] = [section];
