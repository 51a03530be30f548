/**
 * A finished batch's goodness of fit is computed once, in the GOF worker thread, and kept: the rows
 * appear in batch_gof when the batch is done, every read (GOF, summary, board chart, report) gives the
 * same numbers as computing them directly with the batches module's gofOf on the stored chains, and
 * fifty simultaneous readers of a new option share one computation. (How fast, and how /health fares
 * under load, is measured in `npm run bench`, not here.)
 *
 * Basis: an invariant of our own (stored equals computed). gofOf itself is checked against outside
 * references elsewhere: numpy's pinv and quantiles in tests/gof/gof.test.ts (Hyndman & Fan 1996,
 * type 7), and the p-value's calibration in tests/gof/calibration.test.ts.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BatchDetail, GofResponse, GofSummaryResponse } from '../../shared/batches';
import { gofStoreFor } from '../../server/batches/gofStore';
import { checkStatistic, gofOf, periodMatrix } from '../../server/batches/gof';
import { getBatch } from '../../server/batches/service';
import { stopJobQueue } from '../../server/jobs';
import { REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let stats: string;
let reviewer: string;
let batchId: number;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const B = () => `/api/studies/${t.seed.studyId}/batches/${batchId}`;

beforeAll(async () => {
  t = await makeTestApp();
  [stats, reviewer] = await Promise.all([t.tokenFor(STATS), t.tokenFor(REVIEWER)]);
  const res = await request(t.app)
    .post(`/api/studies/${t.seed.studyId}/batches`)
    .set(bearer(stats))
    .send({ model: { rates: [2.5, 2.5], effects: [{ id: 'density', value: -2.2 }, { id: 'reciprocity', value: 1.6 }] }, chains: 80, seed: 11 });
  expect(res.status).toBe(201);
  batchId = res.body.batch.id as number;
  for (let i = 0; i < 600; i++) {
    const b = (await request(t.app).get(B()).set(bearer(stats))).body.batch as BatchDetail;
    if (b.state === 'done') break;
    await sleep(100);
  }
});
afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
});

async function storedPeriods(): Promise<number[]> {
  const rows = (await t.dataSource.query(`SELECT "period" FROM "batch_gof" WHERE "batchId" = ? ORDER BY "period"`, [batchId])) as { period: number }[];
  return rows.map((r) => r.period);
}

describe('the GOF of a finished batch', () => {
  it('is stored for every period once the batch is done, before anyone asks', async () => {
    for (let i = 0; i < 100 && (await storedPeriods()).length < 3; i++) await sleep(50);
    expect(await storedPeriods()).toEqual([0, 1, 2]); // 0: all periods together
  });

  it('reads give the numbers gofOf computes from the stored chains', async () => {
    const before = gofStoreFor(t.dataSource).computations;
    const batch = getBatch(t.dataSource, t.seed.studyId, batchId)!;
    for (const period of [1, 2]) {
      const matrix = periodMatrix(t.dataSource, batch, period);
      for (const statistic of ['triad_census', 'indegree_distribution', 'geodesic_distribution']) {
        const direct = gofOf(batch, matrix, checkStatistic(batch, statistic), period, [0.5, 0.9]);
        const res = await request(t.app).get(`${B()}/gof?statistic=${statistic}&period=${period}`).set(bearer(reviewer));
        expect(res.status).toBe(200);
        expect(res.body as GofResponse).toEqual(JSON.parse(JSON.stringify(direct)));
        const chart = await request(t.app).get(`${B()}/board/chart?statistic=${statistic}&period=${period}`).set(bearer(reviewer));
        expect(chart.status).toBe(200);
        expect(chart.body.pValue).toBe(direct.test.pValue);
        expect(chart.body.mean).toEqual(direct.mean);
      }
    }
    const summary = (await request(t.app).get(`${B()}/gof/summary?period=2`).set(bearer(reviewer))).body as GofSummaryResponse;
    expect(summary.chains).toBe(80);
    expect(summary.rows.map((r) => r.statistic)).toEqual(batch.layout.map((l) => l.statistic));
    // Everything above came from the stored rows: nothing was computed again.
    expect(gofStoreFor(t.dataSource).computations).toBe(before);
  });

  it('fifty simultaneous readers of a new coverage share one computation per period', async () => {
    const store = gofStoreFor(t.dataSource);
    const before = store.computations;
    const replies = await Promise.all(
      Array.from({ length: 50 }, (_, i) =>
        request(t.app).get(`${B()}/gof${i % 2 ? '/summary?' : '?statistic=triad_census&'}period=1&coverage=0.8,0.95`).set(bearer(reviewer)),
      ),
    );
    expect(replies.map((r) => r.status)).toEqual(Array(50).fill(200));
    expect(store.computations - before).toBe(1);
    const gof = replies[0].body as GofResponse;
    expect(gof.bands.map((b) => b.coverage)).toEqual([0.8, 0.95]);
    // Asked again later: remembered.
    await request(t.app).get(`${B()}/gof/summary?period=1&coverage=0.8,0.95`).set(bearer(reviewer)).expect(200);
    expect(store.computations - before).toBe(1);
  });

  it('a bad option is refused before any work, and nothing is stored for it', async () => {
    const res = await request(t.app).get(`${B()}/gof/summary?period=1&coverage=2`).set(bearer(reviewer));
    expect(res.status).toBe(400);
    expect(await t.counts('batch_gof')).toEqual({ batch_gof: 3 }); // periods 1, 2 and all together
  });
});
