/**
 * Goodness of fit over all periods together (`period=all`): chain c's vector is the sum over periods of
 * chain c's vector in that period, the observed vector the sum of the observed end waves' vectors, then
 * the same envelopes and Mahalanobis test as per period. Checked against an outside computation
 * (tests/gof/reference_allperiods.py: numpy sums, quantiles and pinv distance; networkx triad census of
 * the observed waves), stored in batch_gof when the batch finishes, and refused (400) for a batch that
 * lacks one of the study's periods.
 */
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BatchDetail, GofResponse, GofSummaryResponse } from '../../shared/batches';
import type { WaveTiesResponse } from '../../shared/data';
import { stopJobQueue } from '../../server/jobs';
import { runPython } from '../gof/python';
import { REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

interface MahalanobisRef { d_obs: number; p: number; rank: number; out_of_support: number[] }
interface Reference { sim: number[][]; obs: number[]; quantiles: number[][]; pooled: MahalanobisRef; simulated_only: MahalanobisRef }

let t: TestApp;
let stats: string;
let reviewer: string;
let fullId: number;
let partId: number;
const base = () => `/api/studies/${t.seed.studyId}/batches`;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const MODEL = { rates: [2.5, 2.5], effects: [{ id: 'density', value: -2.2 }, { id: 'reciprocity', value: 1.6 }, { id: 'transitive_triplets', value: 0.3 }] };

async function make(body: object): Promise<number> {
  const res = await request(t.app).post(base()).set(bearer(stats)).send(body);
  expect(res.status).toBe(201);
  const id = res.body.batch.id as number;
  for (let i = 0; i < 600; i++) {
    const b = (await request(t.app).get(`${base()}/${id}`).set(bearer(stats))).body.batch as BatchDetail;
    if (b.state === 'done') return id;
    expect(['queued', 'running']).toContain(b.state);
    await sleep(100);
  }
  throw new Error('batch did not finish');
}

/** The simulated vectors of one statistic and period, from the CSV download (chains x components). */
async function csvRows(id: number, statistic: string, period: number): Promise<number[][]> {
  const res = await request(t.app).get(`${base()}/${id}/statistics.csv?statistic=${statistic}&period=${period}`).set(bearer(reviewer));
  expect(res.status).toBe(200);
  return res.text.trim().split('\n').slice(1).map((l) => l.split(',').slice(1).map(Number));
}

beforeAll(async () => {
  t = await makeTestApp();
  [stats, reviewer] = await Promise.all([t.tokenFor(STATS), t.tokenFor(REVIEWER)]);
  fullId = await make({ model: MODEL, chains: 90, seed: 707, statistics: ['triad_census', 'outdegree_distribution'] });
  partId = await make({ model: MODEL, chains: 20, seed: 708, periods: [1], statistics: ['triad_census'] });
});
afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
});

describe('GOF over all periods together', () => {
  it('triad census: equals numpy sums chain by chain and networkx on the observed waves', async () => {
    const res = await request(t.app).get(`${base()}/${fullId}/gof?statistic=triad_census&period=all&coverage=0.5,0.9`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    const gof = res.body as GofResponse;
    expect(gof.period).toBe('all');
    const periods = [];
    for (const p of [1, 2]) {
      const wave = (await request(t.app).get(`/api/studies/${t.seed.studyId}/data/waves/${p + 1}`).set(bearer(reviewer))).body as WaveTiesResponse;
      expect(wave.missing).toEqual([]);
      periods.push({ sim: await csvRows(fullId, 'triad_census', p), obs: null, graph: { n: wave.actors.length, edges: wave.ties } });
    }
    const ref = runPython<Reference>(join(__dirname, '../gof/reference_allperiods.py'), {
      periods,
      components: gof.components,
      probs: [0.25, 0.75, 0.05, 0.95],
      tol: 1e-10,
    });
    // Two periods of C(24,3) = 2024 triples each (Holland & Leinhardt 1976): every summed census totals 4048.
    for (const row of ref.sim) expect(row.reduce((s, v) => s + v, 0)).toBe(4048);
    expect(gof.observed).toEqual(ref.obs);
    expect(gof.test.chains).toBe(90);
    gof.observed.forEach((_, k) => {
      expect(gof.bands[0].lower[k]).toBeCloseTo(ref.quantiles[k][0], 9);
      expect(gof.bands[0].upper[k]).toBeCloseTo(ref.quantiles[k][1], 9);
      expect(gof.bands[1].lower[k]).toBeCloseTo(ref.quantiles[k][2], 9);
      expect(gof.bands[1].upper[k]).toBeCloseTo(ref.quantiles[k][3], 9);
    });
    expect(Math.abs(gof.test.distance - ref.pooled.d_obs)).toBeLessThan(1e-6 * Math.max(1, ref.pooled.d_obs));
    expect(gof.test.pValue).toBeCloseTo(ref.pooled.p, 12);
    expect(gof.test.pValueSimulatedOnly).toBeCloseTo(ref.simulated_only.p, 12);
    expect(gof.test.componentsKept).toBe(ref.pooled.rank);
    expect(gof.test.outOfSupport.map((o) => gof.components.indexOf(o.component))).toEqual(ref.pooled.out_of_support);
  });

  it('outdegree distribution and the summary: the same sums, stored when the batch finished', async () => {
    const periods = [];
    for (const p of [1, 2]) {
      const one = (await request(t.app).get(`${base()}/${fullId}/gof?statistic=outdegree_distribution&period=${p}`).set(bearer(reviewer))).body as GofResponse;
      periods.push({ sim: await csvRows(fullId, 'outdegree_distribution', p), obs: one.observed, graph: null });
    }
    const ref = runPython<Reference>(join(__dirname, '../gof/reference_allperiods.py'), { periods, probs: [0.05, 0.95], tol: 1e-10 });
    const all = (await request(t.app).get(`${base()}/${fullId}/gof?statistic=outdegree_distribution&period=all`).set(bearer(reviewer))).body as GofResponse;
    expect(all.observed).toEqual(ref.obs);
    expect(all.test.pValue).toBeCloseTo(ref.pooled.p, 12);
    expect(Math.abs(all.test.distance - ref.pooled.d_obs)).toBeLessThan(1e-6 * Math.max(1, ref.pooled.d_obs));
    const summary = await request(t.app).get(`${base()}/${fullId}/gof/summary?period=all`).set(bearer(reviewer));
    expect(summary.status).toBe(200);
    const s = summary.body as GofSummaryResponse;
    expect(s.period).toBe('all');
    expect(s.rows.find((r) => r.statistic === 'outdegree_distribution')!.pValue).toBe(all.test.pValue);
    // Stored like a period (as period 0), computed in the same worker when the batch finished.
    const rows = (await t.dataSource.query(`SELECT "period" FROM "batch_gof" WHERE "batchId" = ? ORDER BY "period"`, [fullId])) as { period: number }[];
    expect(rows.map((r) => r.period)).toEqual([0, 1, 2]);
  });

  it('the board chart and the report carry the same all-periods numbers', async () => {
    const all = (await request(t.app).get(`${base()}/${fullId}/gof?statistic=triad_census&period=all`).set(bearer(reviewer))).body as GofResponse;
    const chart = await request(t.app).get(`${base()}/${fullId}/board/chart?statistic=triad_census&period=all`).set(bearer(reviewer));
    expect(chart.status).toBe(200);
    expect(chart.body).toMatchObject({ period: 'all', pValue: all.test.pValue, observed: all.observed, mean: all.mean });
    const report = await request(t.app).get(`${base()}/${fullId}/report.json`).set(bearer(reviewer));
    expect(report.status).toBe(200);
    const row = (report.body.allPeriods as { statistic: string; pValue: number; observed: number[] }[]).find((r) => r.statistic === 'triad_census')!;
    expect(row.pValue).toBe(all.test.pValue);
    expect(row.observed).toEqual(all.observed);
    const csv = await request(t.app).get(`${base()}/${fullId}/report.csv?table=gof`).set(bearer(reviewer));
    expect(csv.status).toBe(200);
    const allRows = csv.text.split('\r\n').filter((l) => l.split(',')[2] === 'all');
    expect(allRows).toHaveLength(all.components.length + ((report.body.allPeriods as { statistic: string; components: string[] }[]).find((r) => r.statistic === 'outdegree_distribution')!.components.length));
    // A one-period batch of a two-period study has no all-periods part in its report.
    const part = await request(t.app).get(`${base()}/${partId}/report.json`).set(bearer(reviewer));
    expect(part.body.allPeriods).toBeNull();
  });

  it('a batch without every period of the study gets a clear 400, and nothing is stored for it', async () => {
    for (const path of ['gof?statistic=triad_census&period=all', 'gof/summary?period=all', 'board/chart?statistic=triad_census&period=all']) {
      const res = await request(t.app).get(`${base()}/${partId}/${path}`).set(bearer(reviewer));
      expect(res.status).toBe(400);
      expect(res.body.error.message).toBe('This batch simulated period 1 only; all periods together needs every period (the study has 2).');
    }
    const rows = (await t.dataSource.query(`SELECT "period" FROM "batch_gof" WHERE "batchId" = ? ORDER BY "period"`, [partId])) as { period: number }[];
    expect(rows.map((r) => r.period)).toEqual([1]);
    // A single period still reads as before.
    expect((await request(t.app).get(`${base()}/${partId}/gof?statistic=triad_census&period=1`).set(bearer(reviewer))).status).toBe(200);
  });
});
