/**
 * The job queue: results stored per chunk and identical whatever the number of workers, a worker
 * killed mid-job, a whole process killed with SIGKILL and restarted on the same file, cancel within a
 * second, failures and refused payloads storing nothing. The reference for the stored values is the
 * seeded stream itself (server/engine/prng.ts deriveSeed), computed here in one thread.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDataSource } from '../../server/db/dataSource';
import { streamFor } from '../../server/engine/prng';
import { JobQueue, syncDb } from '../../server/jobs';
import { ensureSumTable, storedSums, type SumPayload } from './fixtures/sumKind';

const expected = (p: SumPayload) => Array.from({ length: p.chunks * p.unitsPerChunk }, (_, u) => streamFor(p.seed, u).nextDouble());

let dir: string;
let dataSource: DataSource;
const queues: JobQueue[] = [];

function newQueue(workers: number): JobQueue {
  const q = new JobQueue(dataSource, { workers, idleShutdownMs: 5_000 });
  queues.push(q);
  return q;
}

const countRows = (table: string) => (syncDb(dataSource).prepare(`SELECT COUNT(*) AS n FROM "${table}"`).get() as { n: number }).n;
const jobRow = (id: number) => syncDb(dataSource).prepare(`SELECT * FROM "jobs" WHERE "id" = ?`).get(id) as Record<string, unknown>;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'wavefit-jobs-'));
  dataSource = await openDataSource({ database: join(dir, 'jobs.sqlite') });
  ensureSumTable(syncDb(dataSource));
});

afterAll(async () => {
  for (const q of queues) await q.stop();
  await dataSource.destroy();
  rmSync(dir, { recursive: true, force: true });
});

describe('job queue', () => {
  it('runs a job chunk by chunk and stores the same values with 1 and 2 workers', async () => {
    const payload: SumPayload = { chunks: 7, unitsPerChunk: 5, seed: 11 };
    const one = newQueue(1);
    await one.start();
    const a = await one.enqueue('test-sum', payload);
    expect(await one.whenSettled(a)).toBe('done');
    await one.stop();
    const two = newQueue(2);
    await two.start();
    const b = await two.enqueue('test-sum', payload);
    expect(await two.whenSettled(b)).toBe('done');
    const db = syncDb(dataSource);
    expect(storedSums(db, a)).toEqual(expected(payload));
    expect(storedSums(db, b)).toEqual(storedSums(db, a));
    const status = two.status(b)!;
    expect(status).toMatchObject({ state: 'done', progressDone: 35, progressTotal: 35, chunksDone: 7, chunksTotal: 7, attempts: 1 });
    expect(status.finishedAt).toBeInstanceOf(Date);
    await two.stop();
  });

  it('computes a chunk again when its worker thread dies, with identical results', async () => {
    const payload: SumPayload = { chunks: 6, unitsPerChunk: 4, seed: 12, delayMs: 25 };
    const q = newQueue(2);
    await q.start();
    const id = await q.enqueue('test-sum', payload);
    let killed: { jobId: number; chunkIndex: number } | null = null;
    const onProgress = () => {
      if (!killed) killed = q.crashWorkerForTest();
      if (killed) q.off('progress', onProgress);
    };
    q.on('progress', onProgress);
    expect(await q.whenSettled(id)).toBe('done');
    expect(killed).not.toBeNull();
    expect(storedSums(syncDb(dataSource), id)).toEqual(expected(payload));
    expect(String(jobRow(id).log)).toMatch(new RegExp(`worker stopped unexpectedly during chunk ${killed!.chunkIndex}`));
    await q.stop();
  });

  it('resumes after the queue stops mid-job (as after a restart) and loses only the chunks in flight', async () => {
    const payload: SumPayload = { chunks: 8, unitsPerChunk: 3, seed: 13, delayMs: 30 };
    const first = newQueue(2);
    await first.start();
    const id = await first.enqueue('test-sum', payload);
    while (first.status(id)!.chunksDone < 2) await sleep(10);
    await first.stop();
    const stoppedAt = first.status(id)!;
    expect(stoppedAt.state).toBe('running');
    expect(stoppedAt.chunksDone).toBeLessThan(8);
    const second = newQueue(2);
    await second.start();
    expect(await second.whenSettled(id)).toBe('done');
    expect(storedSums(syncDb(dataSource), id)).toEqual(expected(payload));
    expect(jobRow(id).attempts).toBe(2);
    expect(String(jobRow(id).log)).toMatch(/resumed: \d+ of 8 chunks were already stored/);
    await second.stop();
  });

  it('cancels within a second: state cancelled at once, workers stopped, nothing stored afterwards', async () => {
    const payload: SumPayload = { chunks: 10, unitsPerChunk: 10, seed: 14, delayMs: 100 }; // 1 s per chunk
    const q = newQueue(2);
    await q.start();
    const id = await q.enqueue('test-sum', payload);
    while (q.status(id)!.progressDone < 3) await sleep(20); // live progress inside the first chunks
    const { cancelled, ms } = await q.cancel(id);
    expect(cancelled).toBe(true);
    expect(ms).toBeLessThan(1000);
    console.log(`cancel took ${ms.toFixed(1)} ms`);
    expect(q.status(id)!.state).toBe('cancelled');
    const stored = countRows('job_chunks');
    await sleep(1200);
    expect(countRows('job_chunks')).toBe(stored);
    expect(q.liveWorkers).toBe(0);
    expect((await q.cancel(id)).cancelled).toBe(false);
    await q.stop();
  });

  it('fails a job whose chunk throws, with the message, and refuses a bad payload storing nothing', async () => {
    const q = newQueue(1);
    await q.start();
    const id = await q.enqueue('test-sum', { chunks: 4, unitsPerChunk: 2, seed: 15, failChunk: 2 });
    expect(await q.whenSettled(id)).toBe('failed');
    expect(jobRow(id).error).toMatch(/chunk 2 failed: test-sum: this chunk fails on purpose/);
    const jobs = countRows('jobs');
    await expect(q.enqueue('test-sum', { chunks: 0, unitsPerChunk: 2, seed: 1 })).rejects.toThrow(/chunks must be/);
    await expect(q.enqueue('no-such-kind', {})).rejects.toThrow(/unknown job kind/);
    expect(countRows('jobs')).toBe(jobs);
    await q.stop();
  });

  it('survives kill -9 of the whole process: a restart on the same file finishes with identical results', async () => {
    const file = join(dir, 'crash.sqlite');
    const payload: SumPayload = { chunks: 12, unitsPerChunk: 4, seed: 16, delayMs: 40 };
    const run = (args: string[], killAfterChunks?: number) =>
      new Promise<{ code: number | null; signal: NodeJS.Signals | null; out: string }>((resolve) => {
        const child = spawn(process.execPath, ['--import', 'tsx', join(__dirname, 'fixtures/queueProcess.ts'), file, ...args], {
          cwd: join(__dirname, '../..'),
          stdio: ['ignore', 'pipe', 'pipe'],
        });
        let out = '';
        child.stdout.on('data', (d: Buffer) => {
          out += d.toString();
          const m = [...out.matchAll(/chunks (\d+)/g)].pop();
          if (killAfterChunks !== undefined && m && Number(m[1]) >= killAfterChunks) child.kill('SIGKILL');
        });
        child.stderr.on('data', (d: Buffer) => (out += d.toString()));
        child.on('exit', (code, signal) => resolve({ code, signal, out }));
      });
    const first = await run(['enqueue', JSON.stringify(payload)], 3);
    expect(first.signal).toBe('SIGKILL');
    const again = await run([]);
    expect(again.out).toMatch(/settled done/);
    const ds = await openDataSource({ database: file });
    try {
      const db = syncDb(ds);
      const job = db.prepare(`SELECT * FROM "jobs"`).get() as Record<string, unknown>;
      expect(job.state).toBe('done');
      expect(job.attempts).toBe(2);
      expect(storedSums(db, Number(job.id))).toEqual(expected(payload));
    } finally {
      await ds.destroy();
    }
  });
});
