/**
 * Durability of simulation batches on the real "batch" job kind. The reference "uninterrupted run" is
 * the batch worker's runChunk called chunk by chunk in this test's own thread, with the context built
 * from the stored batch: every stored statistics block and the summed tie counts must equal it exactly.
 * - 1 worker, 2 workers, and 2 workers with one worker thread killed mid-batch give identical results;
 * - the whole server (`tsx server/main.ts`, as `npm start` runs it) killed with SIGKILL mid-batch and
 *   started again on the same database file finishes the batch with identical results.
 */
import type { ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exited, killGroup, signInToDemo, startServerProcess, stopIfRunning } from './fixtures/serverProcess';
import { float64FromBlob, int32FromBlob, loadBatchContext, planBatchChunks } from '../../server/batches/jobKind';
import { createBatch } from '../../server/batches/service';
import { runChunk } from '../../server/batches/worker';
import { openDataSource } from '../../server/db/dataSource';
import { seedDemo } from '../../server/demo/seed';
import { jobQueueFor, stopJobQueue, syncDb } from '../../server/jobs';
import type { ParsedCreateBatchBody } from '../../shared/batches';
import { AUX_STATISTIC_IDS } from '../../shared/auxStatistics';

const MODEL = {
  rates: [2.5, 2.5],
  effects: [
    { id: 'density' as const, value: -2.2 },
    { id: 'reciprocity' as const, value: 1.6 },
    { id: 'transitive_triplets' as const, value: 0.3 },
    { id: 'same_covariate' as const, covariate: 'watch', value: 0.9 },
  ],
};
const body = (chains: number, seed: number): ParsedCreateBatchBody => ({ model: MODEL, chains, seed, statistics: [...AUX_STATISTIC_IDS] });
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

interface Stored {
  blocks: Map<string, string>;
  counts: Map<number, string>;
}

function storedResults(ds: DataSource, batchId: number): Stored {
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

/** The uninterrupted reference: every chunk computed here, in order, in one thread. */
async function referenceResults(ds: DataSource, batchId: number, chains: number, periods: number): Promise<Stored> {
  const context = await loadBatchContext(ds, batchId);
  const blocks = new Map<string, string>();
  const sums = new Map<number, { counts: Int32Array; networks: number }>();
  planBatchChunks({ batchId, chains, periods }).forEach(({ chunk }, index) => {
    const result = runChunk(context, chunk);
    for (const per of result.periods) {
      blocks.set(`${per.period}:${index}`, Buffer.from(per.rows.buffer, per.rows.byteOffset, per.rows.byteLength).toString('base64'));
      const s = sums.get(per.period) ?? { counts: new Int32Array(per.counts.length), networks: 0 };
      for (let k = 0; k < s.counts.length; k++) s.counts[k] += per.counts[k];
      s.networks += chunk.chains;
      sums.set(per.period, s);
    }
  });
  const counts = new Map<number, string>();
  for (const [p, s] of sums) counts.set(p, `${s.networks}:${Buffer.from(s.counts.buffer).toString('base64')}`);
  return { blocks, counts };
}

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'wavefit-durability-'));
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

describe('batch durability (in process)', () => {
  let ds: DataSource;
  let studyId: number;
  let userId: number;
  beforeAll(async () => {
    ds = await openDataSource({ database: join(dir, 'inproc.sqlite') });
    const seed = await seedDemo(ds, { passwordHash: { memoryCost: 1024, timeCost: 1, parallelism: 1 } });
    studyId = seed.studyId;
    const [u] = await ds.query(`SELECT "id" FROM "users" LIMIT 1`);
    userId = u.id;
  });
  afterAll(async () => {
    await stopJobQueue(ds);
    await ds.destroy();
  });

  it('1 worker, 2 workers and 2 workers with a killed worker store identical results, equal to the reference', async () => {
    const chains = 600;
    const runs: { workers: number; crash: boolean }[] = [
      { workers: 1, crash: false },
      { workers: 2, crash: false },
      { workers: 2, crash: true },
    ];
    const ids: number[] = [];
    for (const run of runs) {
      // The data source's queue, made here with this run's number of workers; createBatch starts it.
      const queue = jobQueueFor(ds, { workers: run.workers });
      const id = await createBatch(ds, { studyId, userId, body: body(chains, 99) });
      expect(queue.workerCount).toBe(run.workers);
      const [{ jobId }] = await ds.query(`SELECT "jobId" FROM "batches" WHERE "id" = ?`, [id]);
      let killed: { jobId: number; chunkIndex: number } | null = null;
      if (run.crash) {
        // Right after the second stored chunk, kill a worker that is busy with another one.
        let stored = 0;
        const onProgress = () => {
          if (++stored >= 2 && !killed) killed = queue.crashWorkerForTest();
          if (killed) queue.off('progress', onProgress);
        };
        queue.on('progress', onProgress);
      }
      expect(await queue.whenSettled(jobId)).toBe('done');
      if (run.crash) expect(killed).not.toBeNull();
      if (run.crash) expect(queue.status(jobId)!.log).toMatch(/worker stopped unexpectedly/);
      await stopJobQueue(ds);
      ids.push(id);
    }
    const reference = await referenceResults(ds, ids[0], chains, 2);
    expect(reference.blocks.size).toBe(2 * 24);
    for (const id of ids) {
      const stored = storedResults(ds, id);
      expect(stored.blocks).toEqual(reference.blocks);
      expect(stored.counts).toEqual(reference.counts);
    }
    // Sanity of the stored blobs: a row per chain of the right width.
    const one = syncDb(ds).prepare(`SELECT "data", "chains" FROM "batch_results" WHERE "batchId" = ? LIMIT 1`).get(ids[0]) as { data: Buffer; chains: number };
    expect(float64FromBlob(one.data).length % one.chains).toBe(0);
    const tc = syncDb(ds).prepare(`SELECT "counts", "networks" FROM "batch_tie_counts" WHERE "batchId" = ? AND "period" = 1`).get(ids[0]) as { counts: Buffer; networks: number };
    expect(tc.networks).toBe(chains);
    expect(Math.max(...int32FromBlob(tc.counts))).toBeLessThanOrEqual(chains);
  });
});

describe('batch durability across a killed server process', () => {
  const file = () => join(dir, 'server.sqlite');
  const port = 43_000 + Math.floor(Math.random() * 2000);
  const url = `http://127.0.0.1:${port}`;
  let child: ChildProcess | null = null;

  const startServer = () => startServerProcess({ port, dbFile: file(), noDist: join(dir, 'no-dist'), secret: 'durability-test-secret-0123456789', startTimeoutMs: 90_000 });

  afterAll(() => stopIfRunning(child));

  it('kill -9 mid-batch, restart on the same file: the batch finishes with results identical to the reference', async () => {
    child = await startServer();
    const { auth, studyId } = await signInToDemo(url, 'stats@harbourside.example');
    const chains = 3000;
    const created = await fetch(`${url}/api/studies/${studyId}/batches`, { method: 'POST', headers: auth, body: JSON.stringify(body(chains, 31337)) });
    expect(created.status).toBe(201);
    const batchId = ((await created.json()) as { batch: { id: number } }).batch.id;
    const read = async () => ((await (await fetch(`${url}/api/studies/${studyId}/batches/${batchId}`, { headers: auth })).json()) as { batch: { state: string; chainsDone: number; chainsTotal: number } }).batch;
    let seen = await read();
    for (let t = 0; t < 600 && seen.chainsDone < seen.chainsTotal * 0.2; t++) {
      await sleep(50);
      seen = await read();
    }
    expect(seen.state).toBe('running');
    expect(seen.chainsDone).toBeLessThan(seen.chainsTotal);
    killGroup(child, 'SIGKILL');
    await exited(child);
    await sleep(200);

    child = await startServer();
    for (let t = 0; t < 1200; t++) {
      seen = await read();
      if (seen.state !== 'running' && seen.state !== 'queued') break;
      await sleep(100);
    }
    expect(seen.state).toBe('done');
    killGroup(child, 'SIGTERM');
    await exited(child);
    child = null;

    const ds = await openDataSource({ database: file() });
    try {
      const [job] = await ds.query(`SELECT j."attempts", j."log" FROM "jobs" j JOIN "batches" b ON b."jobId" = j."id" WHERE b."id" = ?`, [batchId]);
      expect(job.attempts).toBe(2);
      expect(job.log).toMatch(/resumed: \d+ of 120 chunks were already stored/);
      const stored = storedResults(ds, batchId);
      const reference = await referenceResults(ds, batchId, chains, 2);
      expect(stored.blocks.size).toBe(reference.blocks.size);
      expect(stored.blocks).toEqual(reference.blocks);
      expect(stored.counts).toEqual(reference.counts);
    } finally {
      await ds.destroy();
    }
  });
});
