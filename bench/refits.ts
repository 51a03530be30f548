/**
 * Benchmark of a re-fit study: a four-effect model (density, reciprocity, transitive triplets,
 * three-cycles) on 50 invented crew members over three waves, hand-entered values, re-fitted to
 * R simulated panels through the real job queue (worker threads, SQLite storage) with 2 workers.
 * The target is a 100-re-fit study in under 5 minutes on 2 cores. By default R = 40 re-fits are run
 * and the time is extrapolated to 100 (linear: one fit per chunk, chunks independent); set
 * WAVEFIT_BENCH_REFITS=100 to run the whole study. Figures are printed, never judged.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { availableParallelism, loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import type { DataSource } from 'typeorm';
import { parseUpload } from '../server/data/parse';
import { replaceStudyData } from '../server/data/store';
import { openDataSource } from '../server/db/dataSource';
import { buildEffects } from '../server/engine/effects';
import { createRng, streamFor } from '../server/engine/prng';
import { simulatePeriod } from '../server/engine/simulate';
import { jobQueueFor, stopJobQueue } from '../server/jobs';
import { startFit } from '../server/models/fits';
import { getModelRow } from '../server/models/rows';
import { createModel } from '../server/models/service';
import { createRefit } from '../server/refits/service';
import { dataUploadBodySchema } from '../shared/data';
import { modelSpecBodySchema, startFitBodySchema } from '../shared/models';
import { createRefitBodySchema } from '../shared/refits';
import type { BenchSection } from './engine';

const N = 50;
const EFFECTS = [
  { id: 'density' as const, value: -2.2 },
  { id: 'reciprocity' as const, value: 1.5 },
  { id: 'transitive_triplets' as const, value: 0.3 },
  { id: 'three_cycles' as const, value: -0.1 },
];
const RATE = 4;

async function makeStudy(ds: DataSource): Promise<{ studyId: number; userId: number }> {
  await ds.query(`INSERT INTO "users" ("email", "name", "passwordHash", "isAdmin") VALUES ('bench@harbourside.example', 'Bench', 'x', 0)`);
  await ds.query(`INSERT INTO "studies" ("name", "description") VALUES ('Harbourside re-fit bench', '')`);
  const [{ id: userId }] = await ds.query(`SELECT "id" FROM "users" LIMIT 1`);
  const [{ id: studyId }] = await ds.query(`SELECT "id" FROM "studies" LIMIT 1`);
  const rng = createRng(6160);
  const sparse = new Uint8Array(N * N);
  for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) if (i !== j && rng.nextDouble() < 0.08) sparse[i * N + j] = 1;
  const effects = buildEffects(EFFECTS.map((e) => ({ id: e.id })));
  const params = EFFECTS.map((e) => e.value);
  const w1 = simulatePeriod({ start: sparse, rate: 20, effects, params, rng: streamFor(6160, 0) }).end;
  const w2 = simulatePeriod({ start: w1, rate: RATE, effects, params, rng: streamFor(6160, 1) }).end;
  const w3 = simulatePeriod({ start: w2, rate: RATE, effects, params, rng: streamFor(6160, 2) }).end;
  const label = (i: number) => `crew${String(i + 1).padStart(2, '0')}`;
  const edgeList = (adj: Uint8Array) => {
    const lines = ['sender,receiver'];
    for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) if (adj[i * N + j]) lines.push(`${label(i)},${label(j)}`);
    return lines.join('\n') + '\n';
  };
  const parsed = parseUpload(
    dataUploadBodySchema.parse({
      format: 'edgelist',
      waves: [
        { label: 'spring', content: edgeList(w1.adj) },
        { label: 'summer', content: edgeList(w2.adj) },
        { label: 'autumn', content: edgeList(w3.adj) },
      ],
      actors: { content: ['label', ...Array.from({ length: N }, (_, i) => label(i))].join('\n') + '\n' },
    }),
  );
  if (!parsed.ok) throw new Error(`bench: the generated data do not parse: ${JSON.stringify(parsed.details.problems)}`);
  await replaceStudyData(ds, studyId, parsed.data);
  return { studyId, userId };
}

export const refitSections: BenchSection[] = [
  {
    name: 'Re-fit study: four-effect model, 50 actors, 3 waves, 2 workers',
    async run(print) {
      const R = Math.max(20, Math.min(1000, Number(process.env.WAVEFIT_BENCH_REFITS ?? 40)));
      const dir = mkdtempSync(join(tmpdir(), 'wavefit-bench-refit-'));
      const ds = await openDataSource({ database: join(dir, 'bench.sqlite') });
      try {
        const { studyId, userId } = await makeStudy(ds);
        const modelId = await createModel(
          ds,
          studyId,
          userId,
          modelSpecBodySchema.parse({
            name: 'Four effects',
            rates: [
              { period: 1, estimate: true },
              { period: 2, estimate: true },
            ],
            effects: EFFECTS.map((e) => ({ id: e.id, estimate: true })),
          }),
        );
        const values = Object.fromEntries([['rate:1', RATE], ['rate:2', RATE], ...EFFECTS.map((e) => [e.id, e.value])]);
        const fitId = await startFit(ds, getModelRow(ds, studyId, modelId)!, userId, startFitBodySchema.parse({ mode: 'fixed', values }));
        const queue = jobQueueFor(ds, { workers: 2 });
        const loadBefore = loadavg()[0];
        const t0 = performance.now();
        const refitId = await createRefit(ds, { studyId, userId, body: createRefitBodySchema.parse({ fitIds: [fitId], replications: R, seed: 99 }) });
        const [{ jobId }] = await ds.query(`SELECT "jobId" FROM "refits" WHERE "id" = ?`, [refitId]);
        const state = await queue.whenSettled(jobId);
        const seconds = (performance.now() - t0) / 1000;
        await stopJobQueue(ds);
        const rows = (await ds.query(`SELECT "finished", "converged", "seconds", length("estimates") + length("ses") AS bytes FROM "refit_results" WHERE "refitId" = ?`, [refitId])) as {
          finished: number;
          converged: number;
          seconds: number;
          bytes: number;
        }[];
        const fitSeconds = rows.map((r) => r.seconds);
        const mean = fitSeconds.reduce((s, x) => s + x, 0) / Math.max(1, fitSeconds.length);
        const converged = rows.filter((r) => r.converged).length;
        const share = converged / Math.max(1, rows.length);
        print(`cores ${availableParallelism()}, 1-minute load average ${loadBefore.toFixed(2)} at the start, ${loadavg()[0].toFixed(2)} at the end (above 2 the figures are inflated by other work)`);
        print(`ran ${R} re-fits (one model, 6 estimated parameters: 2 rates + 4 effects, Phase 1 at the hand-entered values, 500 Phase 3 runs), job ${state}`);
        print(`wall time ${seconds.toFixed(1)} s, ${(seconds / R).toFixed(2)} s per re-fit with 2 workers; one re-fit ${mean.toFixed(2)} s on average in its worker`);
        print(`100-re-fit study: ${R === 100 ? `${seconds.toFixed(1)} s measured` : `about ${((seconds / R) * 100).toFixed(0)} s extrapolated from ${R}`} (target under 300 s)`);
        print(`converged (|t| < 0.1 and overall ratio < 0.25) ${converged} of ${rows.length} = ${(share * 100).toFixed(0)}% +- ${(100 * Math.sqrt((share * (1 - share)) / Math.max(1, rows.length))).toFixed(0)}%; failed ${rows.filter((r) => !r.finished).length}`);
        print(`storage: ${rows.length ? rows[0].bytes : 0} bytes of estimates and SEs per re-fit`);
      } finally {
        await ds.destroy();
        rmSync(dir, { recursive: true, force: true });
      }
    },
  },
];
