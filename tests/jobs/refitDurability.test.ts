/**
 * Durability of re-fit studies on the real "refit" job kind. The reference "uninterrupted run" is the
 * re-fit worker's runRefit called chunk by chunk in this test's own thread, with the context built
 * from the stored study: every stored re-fit (estimates, standard errors, convergence) must equal it.
 * - 1 worker, and 2 workers with one worker thread killed mid-study, give identical results;
 * - the whole server (`tsx server/main.ts`) killed with SIGKILL mid-study and started again on the
 *   same database file finishes the study with results identical to the reference.
 * (The same approach as tests/jobs/batchDurability.test.ts.)
 */
import type { ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exited, killGroup, signInToDemo, startServerProcess, stopIfRunning } from './fixtures/serverProcess';
import { openDataSource } from '../../server/db/dataSource';
import { seedDemo } from '../../server/demo/seed';
import { jobQueueFor, stopJobQueue, syncDb } from '../../server/jobs';
import { startFit } from '../../server/models/fits';
import { getModelRow } from '../../server/models/rows';
import { createModel } from '../../server/models/service';
import { loadRefitContext, planRefitChunks } from '../../server/refits/jobKind';
import { createRefit } from '../../server/refits/service';
import { runRefit } from '../../server/refits/worker';
import { modelSpecBodySchema, startFitBodySchema } from '../../shared/models';
import { createRefitBodySchema } from '../../shared/refits';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

type Stored = Map<number, string>;

function storedResults(ds: DataSource, refitId: number): Stored {
  const out: Stored = new Map();
  const rows = syncDb(ds)
    .prepare(`SELECT "chunkIndex", "source", "target", "replication", "finished", "converged", "estimates", "ses", "error" FROM "refit_results" WHERE "refitId" = ?`)
    .all(refitId) as { chunkIndex: number; source: number; target: number; replication: number; finished: number; converged: number; estimates: Buffer; ses: Buffer; error: string | null }[];
  for (const r of rows) {
    out.set(r.chunkIndex, [r.source, r.target, r.replication, r.finished, r.converged, r.estimates.toString('base64'), r.ses.toString('base64'), r.error ?? ''].join('|'));
  }
  return out;
}

async function referenceResults(ds: DataSource, refitId: number, models: number, replications: number, cross: boolean): Promise<Stored> {
  const context = await loadRefitContext(ds, refitId);
  const out: Stored = new Map();
  planRefitChunks({ refitId, models, replications, cross }).forEach(({ chunk }, index) => {
    const r = runRefit(context, chunk);
    const b64 = (a: Float64Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString('base64');
    out.set(index, [chunk.source, chunk.target, chunk.replication, r.finished ? 1 : 0, r.converged ? 1 : 0, b64(r.estimates), b64(r.ses), r.error ?? ''].join('|'));
  });
  return out;
}

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'wavefit-refit-durability-'));
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

describe('re-fit study durability (in process)', () => {
  let ds: DataSource;
  let studyId: number;
  let userId: number;
  let fitId: number;
  beforeAll(async () => {
    ds = await openDataSource({ database: join(dir, 'inproc.sqlite') });
    const seed = await seedDemo(ds, { passwordHash: { memoryCost: 1024, timeCost: 1, parallelism: 1 } });
    studyId = seed.studyId;
    const [u] = await ds.query(`SELECT "id" FROM "users" WHERE "email" = 'stats@harbourside.example'`);
    userId = u.id;
    const modelId = await createModel(
      ds,
      studyId,
      userId,
      modelSpecBodySchema.parse({
        name: 'Reciprocity only',
        rates: [
          { period: 1, estimate: true },
          { period: 2, estimate: true },
        ],
        effects: [
          { id: 'density', estimate: true },
          { id: 'reciprocity', estimate: true },
        ],
      }),
    );
    fitId = await startFit(ds, getModelRow(ds, studyId, modelId)!, userId, startFitBodySchema.parse({ mode: 'fixed', values: { 'rate:1': 3, 'rate:2': 3, density: -2, reciprocity: 1.5 } }));
  });
  afterAll(async () => {
    await stopJobQueue(ds);
    await ds.destroy();
  });

  it('1 worker, and 2 workers with a killed worker, store identical re-fits, equal to the reference', async () => {
    const R = 20;
    const ids: number[] = [];
    for (const run of [
      { workers: 1, crash: false },
      { workers: 2, crash: true },
    ]) {
      const queue = jobQueueFor(ds, { workers: run.workers });
      const id = await createRefit(ds, { studyId, userId, body: createRefitBodySchema.parse({ fitIds: [fitId], replications: R, seed: 777, phase3Runs: 50 }) });
      const [{ jobId }] = await ds.query(`SELECT "jobId" FROM "refits" WHERE "id" = ?`, [id]);
      let killed: { jobId: number; chunkIndex: number } | null = null;
      if (run.crash) {
        let stored = 0;
        const onProgress = () => {
          if (++stored >= 3 && !killed) killed = queue.crashWorkerForTest();
          if (killed) queue.off('progress', onProgress);
        };
        queue.on('progress', onProgress);
      }
      expect(await queue.whenSettled(jobId)).toBe('done');
      if (run.crash) {
        expect(killed).not.toBeNull();
        expect(queue.status(jobId)!.log).toMatch(/worker stopped unexpectedly/);
      }
      await stopJobQueue(ds);
      ids.push(id);
    }
    const reference = await referenceResults(ds, ids[0], 1, R, false);
    expect(reference.size).toBe(R);
    for (const id of ids) expect(storedResults(ds, id)).toEqual(reference);
    // The estimates are not all alike (each panel is its own draw).
    const distinct = new Set([...reference.values()].map((v) => v.split('|')[5]));
    expect(distinct.size).toBe(R);
  });
});

describe('re-fit study durability across a killed server process', () => {
  const file = () => join(dir, 'server.sqlite');
  const port = 45_000 + Math.floor(Math.random() * 2000);
  const url = `http://127.0.0.1:${port}`;
  let child: ChildProcess | null = null;

  const startServer = () => startServerProcess({ port, dbFile: file(), noDist: join(dir, 'no-dist'), secret: 'refit-durability-test-secret-0123456789' });

  afterAll(() => stopIfRunning(child));

  it('kill -9 mid-study, restart on the same file: the study finishes with re-fits identical to the reference', async () => {
    child = await startServer();
    const { auth, studyId } = await signInToDemo(url, 'lead@harbourside.example');
    const models = (await (await fetch(`${url}/api/studies/${studyId}/models`, { headers: auth })).json()) as { models: { latestFit: { id: number; state: string } | null }[] };
    const fitIds = models.models.map((m) => m.latestFit).filter((f) => f && f.state === 'done').map((f) => f!.id).slice(0, 1);
    expect(fitIds.length).toBe(1);
    const R = 20;
    const created = await fetch(`${url}/api/studies/${studyId}/refits`, { method: 'POST', headers: auth, body: JSON.stringify({ fitIds, replications: R, seed: 4242, phase3Runs: 50 }) });
    expect(created.status).toBe(201);
    const refitId = ((await created.json()) as { refit: { id: number } }).refit.id;
    const read = async () => ((await (await fetch(`${url}/api/studies/${studyId}/refits/${refitId}`, { headers: auth })).json()) as { refit: { state: string; refitsDone: number; refitsTotal: number } }).refit;
    let seen = await read();
    for (let t = 0; t < 1200 && seen.refitsDone < 4; t++) {
      await sleep(50);
      seen = await read();
    }
    expect(seen.state).toBe('running');
    expect(seen.refitsDone).toBeLessThan(seen.refitsTotal);
    killGroup(child, 'SIGKILL');
    await exited(child);
    await sleep(200);

    child = await startServer();
    for (let t = 0; t < 1800; t++) {
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
      const [job] = await ds.query(`SELECT j."attempts", j."log" FROM "jobs" j JOIN "refits" r ON r."jobId" = j."id" WHERE r."id" = ?`, [refitId]);
      expect(job.attempts).toBe(2);
      expect(job.log).toMatch(/resumed: \d+ of 20 chunks were already stored/);
      const stored = storedResults(ds, refitId);
      const reference = await referenceResults(ds, refitId, 1, R, false);
      expect(stored.size).toBe(R);
      expect(stored).toEqual(reference);
    } finally {
      await ds.destroy();
    }
  });
});
