/**
 * Demo results for the review board: two candidate models of the Harbourside advice ties, each
 * estimated by the method of moments and simulated in a small batch (100 chains), a review request
 * from the lead to the reviewer, and a first verdict by the statistician. Called by the demo seed
 * (./seed.ts, option withResults) and by the browser tests. Idempotent: models found by name
 * are reused, and nothing is added when the study has batches already.
 */
import type { DataSource } from 'typeorm';
import { createBatchBodySchema } from '../../shared/batches';
import { modelSpecBodySchema, startFitBodySchema, type ModelSpecBody } from '../../shared/models';
import { verdictBodySchema } from '../../shared/review';
import '../batches/jobKind';
import { createBatch, getBatch } from '../batches/service';
import { jobQueueFor, syncDb } from '../jobs';
import '../models/jobKind';
import { startFit } from '../models/fits';
import { getModelRow } from '../models/rows';
import { createModel } from '../models/service';
import { createRequests } from '../review/requests';
import { saveVerdict } from '../review/service';

export const DEMO_CHAINS = 100;

export const DEMO_MODELS: readonly (ModelSpecBody & { fitSeed: number; batchSeed: number })[] = [
  {
    name: 'Structure only',
    description: 'Density, reciprocity and transitive triplets: advice follows the network’s own structure.',
    rates: [
      { period: 1, estimate: true },
      { period: 2, estimate: true },
    ],
    effects: [
      { id: 'density', estimate: true },
      { id: 'reciprocity', estimate: true },
      { id: 'transitive_triplets', estimate: true },
    ],
    fitSeed: 4101,
    batchSeed: 5101,
  },
  {
    name: 'Structure and watch',
    description: 'The same structure plus same watch team: crew ask advice within their own watch.',
    rates: [
      { period: 1, estimate: true },
      { period: 2, estimate: true },
    ],
    effects: [
      { id: 'density', estimate: true },
      { id: 'reciprocity', estimate: true },
      { id: 'transitive_triplets', estimate: true },
      { id: 'same_covariate', covariate: 'watch', estimate: true },
    ],
    fitSeed: 4102,
    batchSeed: 5102,
  },
];

/** Close to the values the demo waves were generated with (./waves.ts), for a fit that will not estimate. */
const FALLBACK_VALUES: Record<string, number> = {
  'rate:1': 2.5,
  'rate:2': 2.5,
  density: -2.2,
  reciprocity: 1.6,
  transitive_triplets: 0.3,
  'same_covariate:watch': 0.9,
};

export interface DemoResults {
  modelIds: number[];
  fitIds: number[];
  batchIds: number[];
  created: boolean;
}

function userId(db: ReturnType<typeof syncDb>, email: string): { id: number; name: string } {
  const row = db.prepare(`SELECT "id", "name" FROM "users" WHERE "email" = ?`).get(email) as { id: number; name: string } | undefined;
  if (!row) throw new Error(`review-demo: the demo user ${email} is missing; seed the users first`);
  return row;
}

export async function seedDemoResults(dataSource: DataSource, studyId: number): Promise<DemoResults> {
  const db = syncDb(dataSource);
  const existing = db.prepare(`SELECT "id" FROM "batches" WHERE "studyId" = ? ORDER BY "id"`).all(studyId) as { id: number }[];
  if (existing.length > 0) return { modelIds: [], fitIds: [], batchIds: existing.map((b) => b.id), created: false };
  const stats = userId(db, 'stats@harbourside.example');
  const lead = userId(db, 'lead@harbourside.example');
  const reviewer = userId(db, 'reviewer@harbourside.example');
  const queue = jobQueueFor(dataSource);
  const result: DemoResults = { modelIds: [], fitIds: [], batchIds: [], created: true };

  for (const demo of DEMO_MODELS) {
    const { fitSeed, batchSeed, ...spec } = demo;
    const found = db.prepare(`SELECT "id" FROM "model_specs" WHERE "studyId" = ? AND "name" = ?`).get(studyId, spec.name) as { id: number } | undefined;
    const modelId = found?.id ?? (await createModel(dataSource, studyId, stats.id, modelSpecBodySchema.parse(spec)));
    let fitId = 0;
    let fitState = 'failed';
    for (let attempt = 0; attempt < 3 && fitState !== 'done'; attempt++) {
      fitId = await startFit(dataSource, getModelRow(dataSource, studyId, modelId)!, stats.id, startFitBodySchema.parse({ seed: fitSeed + attempt }));
      const fitJob = (db.prepare(`SELECT "jobId" FROM "fits" WHERE "id" = ?`).get(fitId) as { jobId: number }).jobId;
      fitState = await queue.whenSettled(fitJob);
      // A failed demo attempt is not worth keeping in the demo study.
      if (fitState !== 'done') db.prepare(`DELETE FROM "fits" WHERE "id" = ? AND "state" != 'done'`).run(fitId);
    }
    if (fitState !== 'done') {
      // The estimation did not succeed from these starts: store the values the demo data were generated with.
      fitId = await startFit(dataSource, getModelRow(dataSource, studyId, modelId)!, stats.id, startFitBodySchema.parse({ mode: 'fixed', seed: fitSeed, values: FALLBACK_VALUES }));
    }
    const batchId = await createBatch(dataSource, {
      studyId,
      userId: stats.id,
      body: createBatchBodySchema.parse({ fitId, chains: DEMO_CHAINS, seed: batchSeed, label: `${spec.name}: ${DEMO_CHAINS} chains` }),
    });
    const batch = getBatch(dataSource, studyId, batchId)!;
    const batchState = await queue.whenSettled(batch.jobId!);
    if (batchState !== 'done') throw new Error(`review-demo: the batch of "${spec.name}" ended ${batchState}`);
    result.modelIds.push(modelId);
    result.fitIds.push(fitId);
    result.batchIds.push(batchId);
  }

  // The second model's batch is up for review: the lead asks the reviewer, the statistician starts.
  const second = getBatch(dataSource, studyId, result.batchIds[1])!;
  await createRequests(dataSource, second, lead, { userIds: [reviewer.id], message: 'Please look at the triad census first.' });
  await saveVerdict(
    dataSource,
    second,
    stats,
    verdictBodySchema.parse({ statistic: 'dyad_census', period: 1, verdict: 'pass', note: 'Fitted by construction (density and reciprocity); a convergence check only.', version: 0 }),
  );
  return result;
}
