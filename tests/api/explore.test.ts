/**
 * Explore the process through the API, on the demo study (24 crew, 3 waves).
 *
 * Checks against things outside the explore code:
 * - choice probabilities of a density + reciprocity fit equal the closed-form logit computed here from
 *   the wave endpoint's ties: toggling i->j has utility (1 - 2 x_ij)(beta_d + beta_r x_ji), "no change"
 *   0 (Snijders 2001, Sociological Methodology 31, the ministep; McFadden 1974, the logit rule);
 * - a replayed chain, rebuilt step by step from the start wave, has the end statistics the batch stored
 *   for that chain (read through the batch's CSV export) and the engine's auxiliary statistics;
 * - tie timelines over all chains end at the stored tie frequencies (read through the consensus endpoint).
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BatchDetail, ConsensusResponse } from '../../shared/batches';
import type { WaveTiesResponse } from '../../shared/data';
import type { ChoiceResponse, OverviewResponse, ReplayResponse, TimelinesResponse } from '../../shared/explore';
import { hashPassword } from '../../server/auth/passwords';
import { loadStudyData } from '../../server/data/store';
import { UserEntity } from '../../server/auth/entities';
import { NetworkState } from '../../server/engine/state';
import { auxStatistic } from '../../server/engine/statistics';
import { stopJobQueue } from '../../server/jobs';
import { REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

const DEMO_MODEL = {
  rates: [2.5, 2.5],
  effects: [
    { id: 'density', value: -2.2 },
    { id: 'reciprocity', value: 1.6 },
    { id: 'transitive_triplets', value: 0.3 },
    { id: 'same_covariate', covariate: 'watch', value: 0.9 },
  ],
};
const CHAINS = 60;

let t: TestApp;
let stats: string;
let reviewer: string;
let outsider: string;
let studyId: number;
let fitId: number;
let batchId: number;
let n: number;
let wave1: WaveTiesResponse;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const ex = () => `/api/studies/${studyId}/explore`;

async function waitDone(id: number): Promise<BatchDetail> {
  for (let i = 0; i < 600; i++) {
    const res = await request(t.app).get(`/api/studies/${studyId}/batches/${id}`).set(bearer(stats));
    const batch = res.body.batch as BatchDetail;
    if (batch.state === 'done' || batch.state === 'failed' || batch.state === 'cancelled') return batch;
    await sleep(100);
  }
  throw new Error('batch did not finish');
}

beforeAll(async () => {
  t = await makeTestApp();
  studyId = t.seed.studyId;
  stats = await t.tokenFor(STATS);
  reviewer = await t.tokenFor(REVIEWER);
  await t.dataSource.getRepository(UserEntity).save({
    email: 'outsider@harbourside.example',
    name: 'Out Sider',
    passwordHash: await hashPassword('outsider-pass-1', t.config.passwordHash),
    isAdmin: false,
  });
  outsider = await t.tokenFor('outsider@harbourside.example', 'outsider-pass-1');
  const model = await request(t.app)
    .post(`/api/studies/${studyId}/models`)
    .set(bearer(stats))
    .send({
      name: 'Density and reciprocity',
      rates: [{ period: 1, estimate: false, value: 2.5 }],
      effects: [
        { id: 'density', estimate: false, value: -2.2 },
        { id: 'reciprocity', estimate: false, value: 1.6 },
      ],
    });
  expect(model.status).toBe(201);
  const fit = await request(t.app).post(`/api/studies/${studyId}/models/${model.body.model.id}/fits`).set(bearer(stats)).send({ mode: 'fixed' });
  expect(fit.body.fit.state).toBe('done');
  fitId = fit.body.fit.id;
  const b = await request(t.app)
    .post(`/api/studies/${studyId}/batches`)
    .set(bearer(stats))
    .send({ model: DEMO_MODEL, chains: CHAINS, seed: 1414, statistics: ['triad_census', 'outdegree_distribution', 'dyad_census'] });
  expect(b.status).toBe(201);
  batchId = b.body.batch.id;
  expect((await waitDone(batchId)).state).toBe('done');
  wave1 = (await request(t.app).get(`/api/studies/${studyId}/data/waves/1`).set(bearer(stats))).body as WaveTiesResponse;
  n = wave1.actors.length;
});

afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
});

describe('explore API: choices of a fit', () => {
  it('every option of an actor has the closed-form logit probability; they sum to 1; most likely first', async () => {
    const x = new Uint8Array(n * n);
    for (const [i, j] of wave1.ties) x[i * n + j] = 1;
    for (const actor of [0, 5, 17]) {
      const res = await request(t.app).get(`${ex()}/fits/${fitId}/choices?period=1&actor=${actor}`).set(bearer(reviewer));
      expect(res.status).toBe(200);
      const body = res.body as ChoiceResponse;
      expect(body.effects.map((e) => e.key)).toEqual(['density', 'reciprocity']);
      expect(body.options.length).toBe(n);
      const u = (j: number) => (1 - 2 * x[actor * n + j]) * (-2.2 + 1.6 * x[j * n + actor]);
      let z = 1;
      for (let j = 0; j < n; j++) if (j !== actor) z += Math.exp(u(j));
      let total = 0;
      body.options.forEach((o, k) => {
        const expected = o.alter === null ? 1 / z : Math.exp(u(o.alter)) / z;
        expect(o.probability).toBeCloseTo(expected, 12);
        if (o.alter !== null) {
          expect(o.contributions[0]).toBeCloseTo((1 - 2 * x[actor * n + o.alter]) * -2.2, 12);
          expect(o.contributions[1]).toBeCloseTo((1 - 2 * x[actor * n + o.alter]) * 1.6 * x[o.alter * n + actor], 12);
          expect(o.tie).toBe(x[actor * n + o.alter]);
        }
        if (k > 0) expect(o.probability).toBeLessThanOrEqual(body.options[k - 1].probability);
        total += o.probability;
      });
      expect(total).toBeCloseTo(1, 12);
    }
  });

  it('the overview holds the same probabilities for every actor, in a complete order', async () => {
    const res = await request(t.app).get(`${ex()}/fits/${fitId}/overview?period=1`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    const body = res.body as OverviewResponse;
    expect(body.orderBy).toBe('cluster');
    expect([...body.order].sort((a, b) => a - b)).toEqual(Array.from({ length: n }, (_, i) => i));
    for (const row of body.probabilities) expect(row.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
    const one = (await request(t.app).get(`${ex()}/fits/${fitId}/choices?period=1&actor=3`).set(bearer(reviewer))).body as ChoiceResponse;
    for (const o of one.options) expect(body.probabilities[3][o.alter ?? 3]).toBeCloseTo(o.probability, 14);
    expect(body.startTies).toEqual(wave1.ties);
    const byWatch = (await request(t.app).get(`${ex()}/fits/${fitId}/overview?period=1&order=covariate:watch`).set(bearer(reviewer))).body as OverviewResponse;
    const watch = (await loadStudyData(t.dataSource, studyId)).covariates.watch;
    expect(watch.kind).toBe('categorical');
    const seen = byWatch.order.map((i) => watch.values[0][i]);
    for (let k = 1; k < seen.length; k++) expect(seen[k]).toBeGreaterThanOrEqual(seen[k - 1]);
    expect(new Set(seen).size).toBeGreaterThan(1);
  });

  it('refuses a period the fit does not cover, an actor outside the study, a bad order and malformed numbers', async () => {
    const cases: [string, number, RegExp][] = [
      [`${ex()}/fits/${fitId}/choices?period=2&actor=0`, 400, /does not cover period 2/],
      [`${ex()}/fits/${fitId}/choices?period=1&actor=24`, 400, /24 actors, numbered 0 to 23; there is no actor 24/],
      [`${ex()}/fits/${fitId}/choices?period=1&actor=abc`, 400, /actor must be a whole number/i],
      [`${ex()}/fits/${fitId}/choices?period=1`, 400, /actor/],
      [`${ex()}/fits/${fitId}/overview?period=1&order=covariate:height`, 400, /no covariate "height"; it has/],
      [`${ex()}/fits/${fitId}/overview?period=1&order=sideways`, 400, /"cluster", "index" or "covariate/],
      [`${ex()}/fits/99999/choices?period=1&actor=0`, 404, /Fit not found/],
    ];
    for (const [url, status, message] of cases) {
      const res = await request(t.app).get(url).set(bearer(stats));
      expect(res.status, url).toBe(status);
      expect(res.body.error.message, url).toMatch(message);
    }
  });
});

describe('explore API: chain replay', () => {
  it('a replayed chain has the end statistics the batch stored for it (CSV export), and its steps add up', async () => {
    const csv = (await request(t.app).get(`/api/studies/${studyId}/batches/${batchId}/statistics.csv?statistic=triad_census&period=2`).set(bearer(reviewer))).text;
    const lines = csv.trim().split('\n').slice(1);
    const wave2 = (await request(t.app).get(`/api/studies/${studyId}/data/waves/2`).set(bearer(stats))).body as WaveTiesResponse;
    const wave3 = (await request(t.app).get(`/api/studies/${studyId}/data/waves/3`).set(bearer(stats))).body as WaveTiesResponse;
    for (const chain of [1, 26, CHAINS]) {
      const res = await request(t.app).get(`${ex()}/batches/${batchId}/replay?period=2&chain=${chain}`).set(bearer(reviewer));
      expect(res.status).toBe(200);
      const r = res.body as ReplayResponse;
      expect(r.matchesStored).toBe(true);
      expect(r.startTies).toEqual(wave2.ties);
      expect(r.observedEndTies).toEqual(wave3.ties);
      expect(r.positions.length).toBe(n);
      expect(r.ministeps).toBe(r.steps.t.length);
      const state = NetworkState.fromEdges(n, r.startTies);
      let changes = 0;
      for (let s = 0; s < r.ministeps; s++) {
        if (r.steps.alter[s] < 0) continue;
        expect(state.toggle(r.steps.actor[s], r.steps.alter[s])).toBe(r.steps.sign[s]);
        changes++;
      }
      expect(changes).toBe(r.changes);
      const end = new Set(wave3.ties.map(([i, j]) => i * n + j));
      let d = 0;
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j && state.tie(i, j) !== (end.has(i * n + j) ? 1 : 0)) d++;
      expect(r.distanceEnd).toBe(d);
      const triads = Array.from(auxStatistic('triad_census', state).values);
      const stored = lines[chain - 1].split(',').slice(1).map(Number);
      expect(Number(lines[chain - 1].split(',')[0])).toBe(chain);
      expect(triads).toEqual(stored);
    }
  });

  it('a chain number outside the batch, a period it did not simulate and malformed input get clear 400s', async () => {
    const cases: [string, RegExp][] = [
      [`replay?period=1&chain=${CHAINS + 1}`, new RegExp(`${CHAINS} chains, numbered 1 to ${CHAINS}; there is no chain ${CHAINS + 1}`)],
      ['replay?period=1&chain=0', /chain must be at least 1/i],
      ['replay?period=1&chain=-3', /chain must be a whole number/i],
      ['replay?period=1&chain=2.5', /chain must be a whole number/i],
      ['replay?period=3&chain=1', /simulated periods 1, 2; there is no period 3/],
      ['timelines?period=1&pairs=0-1;2-3', /pairs as sender-receiver/],
      ['timelines?period=1&pairs=0-0', /two different actors/],
      ['timelines?period=1&pairs=0-99', /numbered 0 to 23/],
      [`timelines?period=1&pairs=0-1&chains=${CHAINS + 5}`, /cannot be re-simulated/],
    ];
    for (const [path, message] of cases) {
      const res = await request(t.app).get(`${ex()}/batches/${batchId}/${path}`).set(bearer(stats));
      expect(res.status, path).toBe(400);
      expect(res.body.error.message, path).toMatch(message);
    }
  });

  it('a non-member gets 404 for every explore endpoint; an unfinished batch is refused with 409', async () => {
    for (const path of [
      `${ex()}/fits/${fitId}/choices?period=1&actor=0`,
      `${ex()}/fits/${fitId}/overview?period=1`,
      `${ex()}/batches/${batchId}/replay?period=1&chain=1`,
      `${ex()}/batches/${batchId}/timelines?period=1&pairs=0-1`,
    ]) {
      const res = await request(t.app).get(path).set(bearer(outsider));
      expect(res.status, path).toBe(404);
      expect(res.body.error.message).toMatch(/Study not found/);
      expect((await request(t.app).get(path)).status).toBe(401);
    }
    const big = await request(t.app)
      .post(`/api/studies/${studyId}/batches`)
      .set(bearer(stats))
      .send({ model: DEMO_MODEL, chains: 5000, seed: 7, statistics: ['dyad_census'] });
    expect(big.status).toBe(201);
    const res = await request(t.app).get(`${ex()}/batches/${big.body.batch.id}/replay?period=1&chain=1`).set(bearer(stats));
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/once it is done/);
    await request(t.app).post(`/api/studies/${studyId}/batches/${big.body.batch.id}/cancel`).set(bearer(stats));
  });
});

describe('explore API: tie timelines', () => {
  it('over all chains, the end value equals the stored tie frequency of the pair; the start is the observed wave', async () => {
    const consensus = (await request(t.app).get(`/api/studies/${studyId}/batches/${batchId}/consensus?period=1&threshold=0.01`).set(bearer(stats)))
      .body as ConsensusResponse;
    const pairs = consensus.ties.slice(0, 8).map(([i, j]) => [i, j] as [number, number]);
    pairs.push([0, 1]);
    const unique = [...new Map(pairs.map((p) => [`${p[0]}-${p[1]}`, p])).values()];
    const res = await request(t.app)
      .get(`${ex()}/batches/${batchId}/timelines?period=1&pairs=${unique.map(([i, j]) => `${i}-${j}`).join(',')}&points=21`)
      .set(bearer(reviewer));
    expect(res.status).toBe(200);
    const body = res.body as TimelinesResponse;
    expect(body.chains).toBe(CHAINS);
    expect(body.grid.length).toBe(21);
    const start = new Set(wave1.ties.map(([i, j]) => `${i}-${j}`));
    for (const p of body.pairs) {
      const freq = consensus.ties.find(([i, j]) => i === p.from && j === p.to)?.[2] ?? 0;
      expect(p.shares[p.shares.length - 1]).toBeCloseTo(freq, 12);
      expect(p.storedEndShare).toBeCloseTo(freq, 12);
      expect(p.shares[0]).toBe(start.has(`${p.from}-${p.to}`) ? 1 : 0);
      expect(p.observedStart).toBe(start.has(`${p.from}-${p.to}`) ? 1 : 0);
    }
    // Fewer chains: the first ones only, honestly counted.
    const few = (await request(t.app).get(`${ex()}/batches/${batchId}/timelines?period=1&pairs=0-1&chains=10`).set(bearer(reviewer))).body as TimelinesResponse;
    expect(few.chains).toBe(10);
    expect(few.batchChains).toBe(CHAINS);
    for (const v of few.pairs[0].shares) expect(Math.round(v * 10)).toBeCloseTo(v * 10, 9);
  });
});

describe('explore API: fixed pairs and absent actors (the simulator\'s masks)', () => {
  // Hale joins at wave 2; Ansel -> Brann is fixed at 0 and Cleo -> Dov at 1 at every wave
  // (the same upload as tests/api/dataMasks.test.ts). A fixed pair and an absent actor are never
  // offered as a choice (common practice for structural zeros and composition change).
  const ACTORS = ['Ansel', 'Brann', 'Cleo', 'Dov', 'Esme', 'Finn', 'Greta', 'Hale'];
  const UPLOAD = {
    format: 'edgelist',
    waves: [
      { label: 'w1', fileName: 'w1.csv', content: 'Cleo,Dov\nBrann,Cleo\nDov,Esme\nEsme,Finn\nFinn,Greta\nGreta,Ansel\nBrann,Ansel\n' },
      { label: 'w2', fileName: 'w2.csv', content: 'Cleo,Dov\nBrann,Cleo\nDov,Esme\nEsme,Finn\nFinn,Hale\nGreta,Ansel\nHale,Greta\nAnsel,Cleo\n' },
      { label: 'w3', fileName: 'w3.csv', content: 'Cleo,Dov\nDov,Esme\nEsme,Finn\nFinn,Hale\nHale,Greta\nAnsel,Cleo\nCleo,Ansel\nBrann,Dov\n' },
    ],
    actors: { fileName: 'crew.csv', content: `label,years,present@1,present@2,present@3\n${ACTORS.map((a, i) => `${a},${i + 2},${a === 'Hale' ? 0 : 1},1,1`).join('\n')}\n` },
    fixedPairs: { fileName: 'fixed.csv', content: 'sender,receiver,value,waves\nAnsel,Brann,0,\nCleo,Dov,1,1-3\n' },
  };
  let sid: number;
  let fit: number;
  let batch: number;
  const A = (name: string) => ACTORS.indexOf(name);

  beforeAll(async () => {
    sid = (await request(t.app).post('/api/studies').set(bearer(stats)).send({ name: 'Masks', description: '' }).expect(201)).body.study.id;
    await request(t.app).post(`/api/studies/${sid}/data`).set(bearer(stats)).send(UPLOAD).expect(201);
    const model = await request(t.app)
      .post(`/api/studies/${sid}/models`)
      .set(bearer(stats))
      .send({ name: 'Density', rates: [{ period: 1, estimate: false, value: 4 }, { period: 2, estimate: false, value: 4 }], effects: [{ id: 'density', estimate: false, value: 0.5 }] })
      .expect(201);
    fit = (await request(t.app).post(`/api/studies/${sid}/models/${model.body.model.id}/fits`).set(bearer(stats)).send({ mode: 'fixed' }).expect(201)).body.fit.id;
    batch = (await request(t.app).post(`/api/studies/${sid}/batches`).set(bearer(stats)).send({ model: { rates: [6, 6], effects: [{ id: 'density', value: 1.5 }] }, chains: 30, seed: 5, statistics: ['dyad_census'] }).expect(201)).body.batch.id;
    for (let i = 0; i < 600; i++) {
      const b = await request(t.app).get(`/api/studies/${sid}/batches/${batch}`).set(bearer(stats));
      if (b.body.batch.state === 'done') break;
      await sleep(100);
    }
  });

  it('a fixed pair and an absent actor are not offered; the absent actor has no explanation', async () => {
    const ansel = (await request(t.app).get(`/api/studies/${sid}/explore/fits/${fit}/choices?period=1&actor=${A('Ansel')}`).set(bearer(stats)).expect(200)).body as ChoiceResponse;
    const alters = ansel.options.map((o) => o.alter);
    expect(alters).not.toContain(A('Brann'));
    expect(alters).not.toContain(A('Hale'));
    expect(ansel.options.length).toBe(ACTORS.length - 1 - 2 + 1);
    expect(ansel.fixedLeftOut).toBe(2);
    // density only: every offered creation has weight e^0.5, a dissolution e^-0.5, no change 1.
    const z = ansel.options.reduce((s, o) => s + (o.alter === null ? 1 : Math.exp(o.tie ? -0.5 : 0.5)), 0);
    for (const o of ansel.options) expect(o.probability).toBeCloseTo((o.alter === null ? 1 : Math.exp(o.tie ? -0.5 : 0.5)) / z, 12);
    const hale = await request(t.app).get(`/api/studies/${sid}/explore/fits/${fit}/choices?period=1&actor=${A('Hale')}`).set(bearer(stats));
    expect(hale.status).toBe(400);
    expect(hale.body.error.message).toMatch(/Hale is not present at both waves of period 1/);
    const ov = (await request(t.app).get(`/api/studies/${sid}/explore/fits/${fit}/overview?period=1`).set(bearer(stats)).expect(200)).body as OverviewResponse;
    expect(ov.absent).toEqual([A('Hale')]);
    expect(ov.fixedPairs).toBe(2);
    expect(ov.probabilities[A('Ansel')][A('Brann')]).toBe(0);
    expect(ov.probabilities[A('Hale')][A('Hale')]).toBe(1);
    for (const row of ov.probabilities) expect(row.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
  });

  it('a replayed chain of a masked batch matches its stored row and never touches a fixed pair or an absent actor', async () => {
    for (const chain of [1, 30]) {
      const r = (await request(t.app).get(`/api/studies/${sid}/explore/batches/${batch}/replay?period=1&chain=${chain}`).set(bearer(stats)).expect(200)).body as ReplayResponse;
      expect(r.matchesStored).toBe(true);
      expect(r.changes).toBeGreaterThan(0);
      for (let s = 0; s < r.ministeps; s++) {
        expect(r.steps.actor[s]).not.toBe(A('Hale'));
        if (r.steps.alter[s] < 0) continue;
        expect(r.steps.alter[s]).not.toBe(A('Hale'));
        expect([r.steps.actor[s], r.steps.alter[s]]).not.toEqual([A('Ansel'), A('Brann')]);
        expect([r.steps.actor[s], r.steps.alter[s]]).not.toEqual([A('Cleo'), A('Dov')]);
      }
    }
  });
});
