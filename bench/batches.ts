/**
 * Benchmarks of simulation batches: 1000 chains of one period on 50 actors with six structural effects
 * and every auxiliary statistic, through the real job queue (worker threads, SQLite storage), with 1
 * and 2 workers; plus the single-thread floor (the worker code called in this thread) and the time of
 * the goodness-of-fit views on the stored rows. Figures are printed, never judged.
 */
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { AUX_STATISTIC_IDS } from '../shared/auxStatistics';
import type { ParsedCreateBatchBody } from '../shared/batches';
import { loadBatchContext, planBatchChunks } from '../server/batches/jobKind';
import { consensusOf } from '../server/batches/consensus';
import { gofSummaryOf, periodMatrix } from '../server/batches/gof';
import { createBatch, getBatch } from '../server/batches/service';
import { runChunk } from '../server/batches/worker';
import { parseUpload } from '../server/data/parse';
import { replaceStudyData } from '../server/data/store';
import { openDataSource } from '../server/db/dataSource';
import { buildEffects } from '../server/engine/effects';
import { createRng, streamFor } from '../server/engine/prng';
import { simulatePeriod } from '../server/engine/simulate';
import { jobQueueFor, stopJobQueue } from '../server/jobs';
import { dataUploadBodySchema } from '../shared/data';
import type { BenchSection } from './engine';

const N_ACTORS = 50;
const CHAINS = 1000;
const EFFECTS = [
  { id: 'density' as const, value: -2.4 },
  { id: 'reciprocity' as const, value: 1.5 },
  { id: 'transitive_triplets' as const, value: 0.25 },
  { id: 'three_cycles' as const, value: -0.1 },
  { id: 'indegree_popularity' as const, value: 0.03 },
  { id: 'outdegree_activity' as const, value: -0.02 },
];
const RATE = 6;

const fmt = (x: number, digits = 1) => x.toFixed(digits);

/** A study with two waves of 50 invented crew members: wave 1 random, wave 2 simulated from it. */
export async function makeStudy(ds: DataSource): Promise<{ studyId: number; userId: number }> {
  await ds.query(`INSERT INTO "users" ("email", "name", "passwordHash", "isAdmin") VALUES ('bench@harbourside.example', 'Bench', 'x', 0)`);
  await ds.query(`INSERT INTO "studies" ("name", "description") VALUES ('Harbourside bench', '')`);
  const [{ id: userId }] = await ds.query(`SELECT "id" FROM "users" LIMIT 1`);
  const [{ id: studyId }] = await ds.query(`SELECT "id" FROM "studies" LIMIT 1`);
  const n = N_ACTORS;
  const rng = createRng(5150);
  const first = new Uint8Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && rng.nextDouble() < 0.07) first[i * n + j] = 1;
  const effects = buildEffects(EFFECTS.map((e) => ({ id: e.id })));
  const second = simulatePeriod({ start: first, rate: RATE, effects, params: EFFECTS.map((e) => e.value), rng: streamFor(5150, 1) }).end.adj;
  const label = (i: number) => `crew${String(i + 1).padStart(2, '0')}`;
  const edgeList = (adj: Uint8Array) => {
    const lines = ['sender,receiver'];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (adj[i * n + j]) lines.push(`${label(i)},${label(j)}`);
    return lines.join('\n') + '\n';
  };
  const actors = ['label', ...Array.from({ length: n }, (_, i) => label(i))].join('\n') + '\n';
  const parsed = parseUpload(
    dataUploadBodySchema.parse({
      format: 'edgelist',
      waves: [
        { label: 'spring', content: edgeList(first) },
        { label: 'autumn', content: edgeList(second) },
      ],
      actors: { content: actors },
    }),
  );
  if (!parsed.ok) throw new Error(`bench: the generated data do not parse: ${JSON.stringify(parsed.details.problems)}`);
  await replaceStudyData(ds, studyId, parsed.data);
  return { studyId, userId };
}

export const body = (chains: number, seed: number): ParsedCreateBatchBody => ({
  model: { rates: [RATE], effects: EFFECTS },
  chains,
  seed,
  statistics: [...AUX_STATISTIC_IDS],
});

async function timedBatch(ds: DataSource, ids: { studyId: number; userId: number }, workers: number, chains: number, seed: number): Promise<{ ms: number; batchId: number }> {
  const queue = jobQueueFor(ds, { workers });
  const t0 = performance.now();
  const batchId = await createBatch(ds, { ...ids, body: body(chains, seed) });
  const [{ jobId }] = await ds.query(`SELECT "jobId" FROM "batches" WHERE "id" = ?`, [batchId]);
  const state = await queue.whenSettled(jobId);
  if (state !== 'done') throw new Error(`bench: batch ${batchId} ended ${state}: ${queue.status(jobId)?.error}`);
  return { ms: performance.now() - t0, batchId };
}

const batchSection: BenchSection = {
  name: `batches: ${CHAINS} chains, one period, ${N_ACTORS} actors, six effects, all auxiliary statistics`,
  async run(print) {
    print(`${availableParallelism()} cores; load average before: ${loadavg().map((x) => x.toFixed(2)).join(', ')} (other processes skew the figures, the scaling most)`);
    const dir = mkdtempSync(join(tmpdir(), 'wavefit-bench-'));
    const file = join(dir, 'bench.sqlite');
    const ds = await openDataSource({ database: file });
    try {
      const ids = await makeStudy(ds);

      // Floor: the worker code in this thread, no queue, no storage.
      const probe = await createBatch(ds, { ...ids, body: body(2, 1) });
      await jobQueueFor(ds).whenSettled(Number((await ds.query(`SELECT "jobId" FROM "batches" WHERE "id" = ?`, [probe]))[0].jobId));
      await stopJobQueue(ds);
      const context = await loadBatchContext(ds, probe);
      context.seed = 424242;
      const f0 = performance.now();
      let ministepsGuess = 0;
      for (const { chunk } of planBatchChunks({ batchId: probe, chains: CHAINS, periods: 1 })) {
        const r = runChunk(context, chunk);
        ministepsGuess += r.periods[0].tieTotal;
      }
      const floorMs = performance.now() - f0;
      print(`single thread, no queue: ${fmt(floorMs / 1000, 2)} s for ${CHAINS} chains (${fmt(floorMs / CHAINS, 2)} ms a chain; mean end ties ${fmt(ministepsGuess / CHAINS)})`);

      const results: Record<number, { cold: number; warm: number; batchId: number }> = {};
      for (const workers of [1, 2]) {
        const cold = await timedBatch(ds, ids, workers, CHAINS, 424242);
        const warm = await timedBatch(ds, ids, workers, CHAINS, 424242);
        await stopJobQueue(ds);
        results[workers] = { cold: cold.ms, warm: warm.ms, batchId: warm.batchId };
        print(
          `queue, ${workers} worker${workers > 1 ? 's' : ''}: ${fmt(cold.ms / 1000, 2)} s from a cold start (workers spawned), ${fmt(warm.ms / 1000, 2)} s with warm workers`,
        );
      }
      print(`scaling 1 -> 2 workers (warm): ${fmt(results[1].warm / results[2].warm, 2)}x; cold: ${fmt(results[1].cold / results[2].cold, 2)}x (ideal 2x on 2 free cores)`);
      print(`target: under 10 s on 2 cores -> ${results[2].cold < 10_000 ? 'met' : 'NOT met'} (${fmt(results[2].cold / 1000, 2)} s cold)`);

      // Storage and the views on the stored rows.
      const [{ bytes }] = await ds.query(
        `SELECT SUM(length("data")) AS bytes FROM "batch_results" WHERE "batchId" = ?`,
        [results[2].batchId],
      );
      const [{ tie }] = await ds.query(`SELECT SUM(length("counts")) AS tie FROM "batch_tie_counts" WHERE "batchId" = ?`, [results[2].batchId]);
      print(`stored: ${fmt(Number(bytes) / 1024)} KB of statistic rows + ${fmt(Number(tie) / 1024)} KB of tie counts per batch; database file ${fmt(statSync(file).size / 1048576)} MB after ${2 * 2 + 1} batches`);
      const batch = getBatch(ds, ids.studyId, results[2].batchId)!;
      const g0 = performance.now();
      const matrix = periodMatrix(ds, batch, 1);
      const g1 = performance.now();
      const summary = gofSummaryOf(batch, matrix, 1, [0.5, 0.9]);
      const g2 = performance.now();
      await consensusOf(ds, batch, 1, { threshold: '0.5' });
      const g3 = performance.now();
      print(
        `views: rows read ${fmt(g1 - g0)} ms; GOF of all ${summary.rows.length} statistics (envelopes + 2 Mahalanobis tests each) ${fmt(g2 - g1)} ms; consensus at 0.5 ${fmt(g3 - g2)} ms`,
      );
      print(`load average after: ${loadavg().map((x) => x.toFixed(2)).join(', ')}`);
      print(`p-values: ${summary.rows.map((r) => `${r.statistic} ${r.pValue.toFixed(3)}`).join(', ')}`);
    } finally {
      await stopJobQueue(ds);
      await ds.destroy();
      rmSync(dir, { recursive: true, force: true });
    }
  },
};

export const batchSections: BenchSection[] = [batchSection];
