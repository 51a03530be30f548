/**
 * Simulation batches through the API, on the demo study (24 crew, 3 waves): making a batch, progress,
 * the goodness-of-fit views checked against an outside computation from the exported CSV (numpy:
 * quantile type 7 and pinv-based Mahalanobis distances, tests/gof/reference_gof.py), the consensus
 * network checked against the wave data endpoint (its wave-to-wave Jaccard index), reproducibility of
 * a seed, cancel, and bad requests that must store nothing.
 */
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BatchDetail, ConsensusResponse, GofResponse, GofSummaryResponse } from '../../shared/batches';
import type { StudyDataResponse, WaveTiesResponse } from '../../shared/data';
import { hashPassword } from '../../server/auth/passwords';
import { MembershipEntity } from '../../server/team/entities';
import { StudyEntity } from '../../server/studies/entities';
import { UserEntity } from '../../server/auth/entities';
import { jobQueueFor, stopJobQueue } from '../../server/jobs';
import { runPython } from '../gof/python';
import { REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

/** The demo study's own generating model (server/demo/waves.ts), entered by hand. */
const DEMO_MODEL = {
  rates: [2.5, 2.5],
  effects: [
    { id: 'density', value: -2.2 },
    { id: 'reciprocity', value: 1.6 },
    { id: 'transitive_triplets', value: 0.3 },
    { id: 'same_covariate', covariate: 'watch', value: 0.9 },
  ],
};

let t: TestApp;
let stats: string;
let reviewer: string;
let outsider: string;
let studyId: number;
let otherStudyId: number;

const base = () => `/api/studies/${studyId}/batches`;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function waitDone(id: number, token = stats): Promise<BatchDetail> {
  for (let i = 0; i < 600; i++) {
    const res = await request(t.app).get(`${base()}/${id}`).set(bearer(token));
    expect(res.status).toBe(200);
    const batch = res.body.batch as BatchDetail;
    if (batch.state === 'done' || batch.state === 'failed' || batch.state === 'cancelled') return batch;
    await sleep(100);
  }
  throw new Error('batch did not finish');
}

function parseCsv(text: string): { header: string[]; chains: number[]; rows: number[][] } {
  const lines = text.trim().split('\n');
  const header = lines[0].split(',');
  const chains = lines.slice(1).map((l) => Number(l.split(',')[0]));
  const rows = lines.slice(1).map((l) => l.split(',').slice(1).map(Number));
  return { header, chains, rows };
}

beforeAll(async () => {
  t = await makeTestApp();
  studyId = t.seed.studyId;
  stats = await t.tokenFor(STATS);
  reviewer = await t.tokenFor(REVIEWER);
  const users = t.dataSource.getRepository(UserEntity);
  const outsiderUser = await users.save({ email: 'outsider@harbourside.example', name: 'Out Sider', passwordHash: await hashPassword('outsider-pass-1', t.config.passwordHash), isAdmin: false });
  outsider = await t.tokenFor('outsider@harbourside.example', 'outsider-pass-1');
  const other = await t.dataSource.getRepository(StudyEntity).save({ name: 'Another station', description: '' });
  otherStudyId = other.id;
  await t.dataSource.getRepository(MembershipEntity).insert({ userId: outsiderUser.id, studyId: other.id, role: 'lead' });
});

afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
});

/** A hand-entered fit of a one-period model (density and reciprocity), through the models API. */
async function fixedFit(token: string, study: number): Promise<number> {
  const model = await request(t.app)
    .post(`/api/studies/${study}/models`)
    .set(bearer(token))
    .send({
      name: 'Density and reciprocity',
      rates: [{ period: 1, estimate: false, value: 2.5 }],
      effects: [
        { id: 'density', estimate: false, value: -2.2 },
        { id: 'reciprocity', estimate: false, value: 1.6 },
      ],
    });
  expect(model.status).toBe(201);
  const fit = await request(t.app).post(`/api/studies/${study}/models/${model.body.model.id}/fits`).set(bearer(token)).send({ mode: 'fixed' });
  expect(fit.status).toBe(201);
  expect(fit.body.fit.state).toBe('done');
  return fit.body.fit.id as number;
}

describe('batches API', () => {
  let batchId: number;

  it('a statistician makes a batch from a hand-entered model; it runs to done with progress', async () => {
    const res = await request(t.app)
      .post(base())
      .set(bearer(stats))
      .send({ model: DEMO_MODEL, chains: 120, seed: 4242, statistics: ['triad_census', 'outdegree_distribution', 'dyad_census', 'geodesic_distribution'] });
    expect(res.status).toBe(201);
    const created = res.body.batch as BatchDetail;
    expect(created).toMatchObject({ chains: 120, seed: 4242, periods: [1, 2], chainsTotal: 240, source: 'hand-entered', actors: 24 });
    expect(['queued', 'running']).toContain(created.state);
    expect(created.layout.map((l) => l.statistic)).toEqual(['triad_census', 'outdegree_distribution', 'dyad_census', 'geodesic_distribution']);
    batchId = created.id;
    const done = await waitDone(batchId);
    expect(done.state).toBe('done');
    expect(done.chainsDone).toBe(240);
    expect(done.finishedAt).not.toBeNull();
    const list = await request(t.app).get(base()).set(bearer(reviewer));
    expect(list.status).toBe(200);
    expect(list.body.batches.map((b: BatchDetail) => b.id)).toContain(batchId);
  });

  it('GOF of the triad census equals numpy on the exported CSV (quantiles type 7, pinv Mahalanobis, North et al. p-value)', async () => {
    const csv = await request(t.app).get(`${base()}/${batchId}/statistics.csv?statistic=triad_census&period=1`).set(bearer(reviewer));
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    const { header, chains, rows } = parseCsv(csv.text);
    expect(chains).toEqual(Array.from({ length: 120 }, (_, k) => k + 1));
    expect(header).toEqual(['chain', ...['003', '012', '102', '021D', '021U', '021C', '111D', '111U', '030T', '030C', '201', '120D', '120U', '120C', '210', '300'].map((c) => `triad_census:${c}`)]);
    expect(rows).toHaveLength(120);
    // Every simulated census counts all C(24,3) = 2024 triples (Holland & Leinhardt 1976).
    for (const r of rows) expect(r.reduce((s, v) => s + v, 0)).toBe(2024);
    const res = await request(t.app).get(`${base()}/${batchId}/gof?statistic=triad_census&period=1&coverage=0.5,0.9`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    const gof = res.body as GofResponse;
    const observed = gof.observed;
    // The observed census of wave 2 (the end of period 1) equals networkx.triadic_census of its ties.
    const wave2 = (await request(t.app).get(`/api/studies/${studyId}/data/waves/2`).set(bearer(reviewer))).body as WaveTiesResponse;
    const nx = runPython<{ census: Record<string, number>[] }>(join(__dirname, '../gof/reference_triads.py'), {
      graphs: [{ n: wave2.actors.length, edges: wave2.ties }],
    });
    expect(wave2.missing).toEqual([]);
    expect(observed).toEqual(gof.components.map((label) => nx.census[0][label]));
    const ref = runPython<{ quantiles: number[][]; mahalanobis: { d_obs: number; p: number; rank: number; out_of_support: number[] }[] }>(
      join(__dirname, '../gof/reference_gof.py'),
      {
        quantiles: observed.map((_, k) => ({ values: rows.map((r) => r[k]), probs: [0.25, 0.75, 0.05, 0.95] })),
        // Headline: observed counted in the mean and covariance ("pooled"); beside it the simulated-only form.
        mahalanobis: [
          { sim: rows, obs: observed, tol: 1e-10, reference: 'pooled' },
          { sim: rows, obs: observed, tol: 1e-10 },
        ],
      },
    );
    observed.forEach((_, k) => {
      expect(gof.bands[0].lower[k]).toBeCloseTo(ref.quantiles[k][0], 9);
      expect(gof.bands[0].upper[k]).toBeCloseTo(ref.quantiles[k][1], 9);
      expect(gof.bands[1].lower[k]).toBeCloseTo(ref.quantiles[k][2], 9);
      expect(gof.bands[1].upper[k]).toBeCloseTo(ref.quantiles[k][3], 9);
    });
    const m = ref.mahalanobis[0];
    expect(Math.abs(gof.test.distance - m.d_obs)).toBeLessThan(1e-6 * Math.max(1, m.d_obs));
    expect(gof.test.pValue).toBeCloseTo(m.p, 12);
    expect(gof.test.pValueSimulatedOnly).toBeCloseTo(ref.mahalanobis[1].p, 12);
    expect(gof.test.componentsKept).toBe(m.rank);
    // The census components sum to a constant, so at most 15 directions can vary.
    expect(gof.test.componentsKept).toBeLessThanOrEqual(15);
    expect(gof.test.outOfSupport.map((o) => gof.components.indexOf(o.component))).toEqual(m.out_of_support);
    // 120 chains: the caution about the p-value's resolution (1/121) must be there.
    expect(gof.caution).toMatch(/With 120 chains a p-value below 1\/\(N\+1\) = 0\.008/);
    expect(gof.caution).toMatch(/fits the number of transitive triplets, a weighted sum of triad counts/);
    expect(gof.reading).toMatch(/p = /);
  });

  it('marks the dyad census as fitted by density + reciprocity (only a convergence check)', async () => {
    const res = await request(t.app).get(`${base()}/${batchId}/gof?statistic=dyad_census&period=2`).set(bearer(stats));
    expect(res.status).toBe(200);
    expect((res.body as GofResponse).caution).toMatch(/matched by construction: read it only as a check that the estimation converged/);
    const summary = await request(t.app).get(`${base()}/${batchId}/gof/summary?period=2`).set(bearer(reviewer));
    expect(summary.status).toBe(200);
    const s = summary.body as GofSummaryResponse;
    expect(s.rows.map((r) => r.statistic)).toEqual(['triad_census', 'outdegree_distribution', 'dyad_census', 'geodesic_distribution']);
    for (const r of s.rows) expect(r.pValue).toBeGreaterThanOrEqual(1 / 121);
  });

  it('the consensus network is compared with the observed end wave; the baseline equals the data page Jaccard', async () => {
    const res = await request(t.app).get(`${base()}/${batchId}/consensus?period=1&threshold=0.5`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    const c = res.body as ConsensusResponse;
    const wave2 = (await request(t.app).get(`/api/studies/${studyId}/data/waves/2`).set(bearer(reviewer))).body as WaveTiesResponse;
    const observed = new Set(wave2.ties.map(([i, j]) => `${i},${j}`));
    const kept = c.ties.map(([i, j]) => `${i},${j}`);
    for (const [, , f] of c.ties) expect(f).toBeGreaterThanOrEqual(0.5);
    const matched = kept.filter((k) => observed.has(k)).length;
    expect(c.comparison.matched).toBe(matched);
    expect(c.comparison.extra).toBe(kept.length - matched);
    expect(c.comparison.missed).toBe(observed.size - matched);
    expect(c.observedTies).toBe(observed.size);
    // Jaccard (1912): matched / (matched + missed + extra).
    expect(c.comparison.jaccard).toBeCloseTo(matched / (matched + c.comparison.missed + c.comparison.extra), 12);
    const data = (await request(t.app).get(`/api/studies/${studyId}/data`).set(bearer(reviewer))).body as StudyDataResponse;
    expect(c.persistence).toBeCloseTo(data.changes[0].jaccard!, 12);
    const top = await request(t.app).get(`${base()}/${batchId}/consensus?period=1&top=1`).set(bearer(reviewer));
    expect(top.status).toBe(200);
    expect(top.body.ties).toHaveLength(top.body.top);
    expect(top.body.top).toBe(Math.round(top.body.meanSimulatedTies));
  });

  it('a batch simulates a stored fit: its values are copied and only its periods run', async () => {
    const fitId = await fixedFit(stats, studyId);
    const res = await request(t.app).post(base()).set(bearer(stats)).send({ fitId, chains: 20, seed: 3, statistics: ['dyad_census'] });
    expect(res.status).toBe(201);
    const batch = res.body.batch as BatchDetail;
    expect(batch.source).toBe('fit');
    expect(batch.fitId).toBe(fitId);
    expect(batch.periods).toEqual([1]);
    expect(batch.model.rates).toEqual([2.5, null]);
    expect(batch.model.effects.map((e) => [e.id, e.value])).toEqual([
      ['density', -2.2],
      ['reciprocity', 1.6],
    ]);
    expect((await waitDone(batch.id)).state).toBe('done');
  });

  it('the same seed gives the same stored statistics', async () => {
    const res = await request(t.app).post(base()).set(bearer(stats)).send({ model: DEMO_MODEL, chains: 30, seed: 4242, statistics: ['triad_census'], periods: [1] });
    expect(res.status).toBe(201);
    const again = await waitDone(res.body.batch.id);
    expect(again.state).toBe('done');
    const a = parseCsv((await request(t.app).get(`${base()}/${batchId}/statistics.csv?statistic=triad_census&period=1`).set(bearer(stats))).text);
    const b = parseCsv((await request(t.app).get(`${base()}/${again.id}/statistics.csv?statistic=triad_census&period=1`).set(bearer(stats))).text);
    expect(b.rows).toEqual(a.rows.slice(0, 30));
  });

  it('cancel stops a running batch and keeps no partial results; results of an unfinished batch are refused', async () => {
    const res = await request(t.app).post(base()).set(bearer(stats)).send({ model: DEMO_MODEL, chains: 20000, seed: 1 });
    expect(res.status).toBe(201);
    const id = res.body.batch.id as number;
    const early = await request(t.app).get(`${base()}/${id}/gof?statistic=triad_census`).set(bearer(stats));
    expect(early.status).toBe(409);
    expect(early.body.error.code).toBe('batch_not_ready');
    const denied = await request(t.app).post(`${base()}/${id}/cancel`).set(bearer(reviewer));
    expect(denied.status).toBe(403);
    const cancel = await request(t.app).post(`${base()}/${id}/cancel`).set(bearer(stats));
    expect(cancel.status).toBe(200);
    expect(cancel.body.batch.state).toBe('cancelled');
    await sleep(300);
    const [{ n }] = await t.dataSource.query(`SELECT COUNT(*) AS n FROM "batch_results" WHERE "batchId" = ?`, [id]);
    expect(Number(n)).toBe(0);
    const again = await request(t.app).post(`${base()}/${id}/cancel`).set(bearer(stats));
    expect(again.status).toBe(200);
    expect(again.body.batch.state).toBe('cancelled');
  });
});

describe('bad batch requests store nothing', () => {
  const tables = ['batches', 'jobs', 'batch_tie_counts', 'batch_results'];
  const cases: { name: string; body: object; status: number; message: RegExp }[] = [
    { name: 'zero chains', body: { model: DEMO_MODEL, chains: 0 }, status: 400, message: /Run at least 2 chains/ },
    { name: 'absurd chains', body: { model: DEMO_MODEL, chains: 1_000_000 }, status: 400, message: /At most 20000 chains/ },
    { name: 'fractional chains', body: { model: DEMO_MODEL, chains: 10.5 }, status: 400, message: /whole number/ },
    { name: 'unknown statistic', body: { model: DEMO_MODEL, statistics: ['triad_census', 'clustering'] }, status: 400, message: /Unknown statistic "clustering"/ },
    { name: 'neither fit nor model', body: { chains: 10 }, status: 400, message: /either a fitId .* or a model/ },
    { name: 'both fit and model', body: { fitId: 1, model: DEMO_MODEL }, status: 400, message: /either a fitId/ },
    { name: 'a fit that is not in this study', body: { fitId: 987654 }, status: 404, message: /Fit not found in this study/ },
    { name: 'wrong number of rates', body: { model: { ...DEMO_MODEL, rates: [2.5] } }, status: 400, message: /needs 2 rates \(one per period\); 1 was given/ },
    { name: 'a covariate the study lacks', body: { model: { rates: [1, 1], effects: [{ id: 'covariate_alter', covariate: 'height', value: 1 }] } }, status: 400, message: /covariate "height", which is not given/ },
    { name: 'a period the study lacks', body: { model: DEMO_MODEL, periods: [3] }, status: 400, message: /there is no period 3/ },
    { name: 'a negative rate', body: { model: { ...DEMO_MODEL, rates: [-1, 2] } }, status: 400, message: /greater than 0/ },
    { name: 'a runaway rate', body: { model: { ...DEMO_MODEL, rates: [1e9, 1] } }, status: 400, message: /rate may be at most 10000/ },
  ];
  for (const c of cases) {
    it(c.name, async () => {
      const before = await t.counts(...tables);
      const res = await request(t.app).post(base()).set(bearer(stats)).send(c.body);
      expect(res.status).toBe(c.status);
      expect(res.body.error.message).toMatch(c.message);
      expect(await t.counts(...tables)).toEqual(before);
    });
  }

  it('a fit of another study is not found (404), and a period the fit does not cover is refused', async () => {
    // A hand-entered ("fixed") fit in the other study, made through the models API.
    const upload = await request(t.app)
      .post(`/api/studies/${otherStudyId}/data`)
      .set(bearer(outsider))
      .send({ format: 'edgelist', waves: [{ label: 'w1', content: 'a,b\nb,c\n' }, { label: 'w2', content: 'a,b\nc,a\n' }], actors: { content: 'label\na\nb\nc\n' } });
    expect(upload.status).toBe(201);
    const foreignFit = await fixedFit(outsider, otherStudyId);
    const before = await t.counts(...tables);
    const res = await request(t.app).post(base()).set(bearer(stats)).send({ fitId: foreignFit, chains: 10 });
    expect(res.status).toBe(404);
    expect(res.body.error.message).toMatch(/Fit not found in this study/);
    const ownFit = await fixedFit(stats, studyId);
    const uncovered = await request(t.app).post(base()).set(bearer(stats)).send({ fitId: ownFit, chains: 10, periods: [2] });
    expect(uncovered.status).toBe(400);
    expect(uncovered.body.error.message).toMatch(/does not cover period 2; it covers period 1/);
    expect(await t.counts(...tables)).toEqual(before);
  });

  it('a reviewer may not queue a batch (403) and an outsider does not see the study (404)', async () => {
    const before = await t.counts(...tables);
    const res = await request(t.app).post(base()).set(bearer(reviewer)).send({ model: DEMO_MODEL, chains: 10 });
    expect(res.status).toBe(403);
    expect(res.body.error.message).toMatch(/run fits and simulation batches/);
    const out = await request(t.app).post(base()).set(bearer(outsider)).send({ model: DEMO_MODEL, chains: 10 });
    expect(out.status).toBe(404);
    const read = await request(t.app).get(base()).set(bearer(outsider));
    expect(read.status).toBe(404);
    expect(await t.counts(...tables)).toEqual(before);
  });

  it('a study with batches refuses new data without confirmation (409) and names the batch, so stored results are not silently orphaned', async () => {
    const created = await request(t.app).post('/api/studies').set(bearer(outsider)).send({ name: 'Third station', description: '' });
    expect(created.status).toBe(201);
    const third = created.body.study.id as number;
    const upload = { format: 'edgelist', waves: [{ label: 'w1', content: 'a,b\nb,c\n' }, { label: 'w2', content: 'a,b\nc,a\n' }], actors: { content: 'label\na\nb\nc\n' } };
    expect((await request(t.app).post(`/api/studies/${third}/data`).set(bearer(outsider)).send(upload)).status).toBe(201);
    const batch = await request(t.app)
      .post(`/api/studies/${third}/batches`)
      .set(bearer(outsider))
      .send({ model: { rates: [1], effects: [{ id: 'density', value: -1 }] }, chains: 4, seed: 1 });
    expect(batch.status).toBe(201);
    const again = await request(t.app).post(`/api/studies/${third}/data`).set(bearer(outsider)).send(upload);
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('data_in_use');
    // while the batch runs the refusal says to wait; once it is done it says the batch becomes stale
    expect(again.body.error.message).toMatch(/1 batch was built on the data stored now|batch is still queued or running/);
  });

  it('a batch of another study is not found through this study', async () => {
    const res = await request(t.app).post(`/api/studies/${otherStudyId}/batches`).set(bearer(outsider)).send({ model: DEMO_MODEL, chains: 10 });
    // The other study has one period: the demo model's two rates are refused before anything is stored.
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/needs 1 rate \(one per period\); 2 were given/);
    const list = await request(t.app).get(base()).set(bearer(stats));
    const some = list.body.batches[0].id as number;
    const cross = await request(t.app).get(`/api/studies/${otherStudyId}/batches/${some}`).set(bearer(outsider));
    expect(cross.status).toBe(404);
    expect(jobQueueFor(t.dataSource).isRunning).toBe(true);
  });
});
