/**
 * Score-type tests of candidate effects through the API, on the demo study with a hand-entered fit of
 * density and reciprocity (Schweinberger 2012, British Journal of Mathematical and Statistical
 * Psychology 65:263-281; the engine's calibration, power and one-step checks are in
 * tests/estimate/scoreTest.test.ts). Checked here: every catalogue effect not in the model is tested
 * or said to be skipped, the list is ranked by p-value, p-values are the chi-square (1 df) tail of the
 * statistic (scipy.stats.chi2.sf), the extended model can be saved
 * as it comes, and bad input is refused.
 */
import { spawnSync } from 'node:child_process';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { EFFECT_CATALOGUE } from '../../shared/effects';
import type { ScoreTestsResponse } from '../../shared/scoreTests';
import { stopJobQueue } from '../../server/jobs';
import { STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let stats: string;
let studyId: number;
let modelId: number;
let fitId: number;

beforeAll(async () => {
  t = await makeTestApp();
  studyId = t.seed.studyId;
  stats = await t.tokenFor(STATS);
  const model = await request(t.app)
    .post(`/api/studies/${studyId}/models`)
    .set(bearer(stats))
    .send({
      name: 'Structure only',
      rates: [
        { period: 1, estimate: false, value: 2.5 },
        { period: 2, estimate: false, value: 2.5 },
      ],
      effects: [
        { id: 'density', value: -1.9, estimate: false },
        { id: 'reciprocity', value: 1.4, estimate: false },
      ],
    });
  expect(model.status).toBe(201);
  modelId = model.body.model.id;
  const fit = await request(t.app).post(`/api/studies/${studyId}/models/${modelId}/fits`).set(bearer(stats)).send({ mode: 'fixed' });
  expect(fit.status).toBe(201);
  fitId = fit.body.fit.id;
});

afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
});

const path = () => `/api/studies/${studyId}/models/${modelId}/fits/${fitId}/score-tests`;

describe('score-type tests of a fit', () => {
  let body: ScoreTestsResponse;
  it('tests every catalogue effect not in the model (or says why not), ranked by p-value', async () => {
    const res = await request(t.app).get(`${path()}?runs=30`).set(bearer(stats));
    expect(res.status).toBe(200);
    body = res.body as ScoreTestsResponse;
    const keys = body.candidates.map((c) => c.key);
    expect(keys).not.toContain('density');
    expect(keys).not.toContain('reciprocity');
    const structural = EFFECT_CATALOGUE.filter((e) => e.covariate === 'none' && !['density', 'reciprocity'].includes(e.id)).map((e) => e.id);
    for (const id of structural) expect(keys.includes(id) || body.skipped.some((s) => s.label === EFFECT_CATALOGUE.find((e) => e.id === id)!.label)).toBe(true);
    expect(body.candidates.length).toBeGreaterThan(3);
    const ps = body.candidates.map((c) => c.pValue);
    expect([...ps].sort((a, b) => a - b)).toEqual(ps);
    expect(body.runs).toBe(30);
    expect(body.caution).toMatch(/30 simulations/);
    for (const c of body.candidates) expect(c.sentence).toContain(c.label.toLowerCase());
  });

  it('p-values are the chi-square (1 df) tail of the statistics (scipy)', () => {
    const xs = body.candidates.map((c) => c.statistic);
    const out = spawnSync('/usr/bin/python3', ['-c', `from scipy.stats import chi2; import json; print(json.dumps([float(chi2.sf(x, 1)) for x in ${JSON.stringify(xs)}]))`], { encoding: 'utf8' });
    const ref = JSON.parse(out.stdout) as number[];
    body.candidates.forEach((c, k) => expect(Math.abs(c.pValue - ref[k])).toBeLessThan(1e-6 + 1e-6 * ref[k]));
  });

  it('the extended model of the top candidate saves as it comes, with the effect estimated', async () => {
    const top = body.candidates[0];
    const res = await request(t.app).post(`/api/studies/${studyId}/models`).set(bearer(stats)).send(top.extendedModel);
    expect(res.status).toBe(201);
    const effects = res.body.model.effects as { id: string; covariate?: string; estimate: boolean }[];
    expect(effects).toHaveLength(3);
    expect(effects[2]).toMatchObject({ id: top.effectId, estimate: true });
  });

  it('refuses a bad number of simulations and an unknown fit', async () => {
    expect((await request(t.app).get(`${path()}?runs=5`).set(bearer(stats))).status).toBe(400);
    expect((await request(t.app).get(`${path()}?runs=abc`).set(bearer(stats))).status).toBe(400);
    expect((await request(t.app).get(`/api/studies/${studyId}/models/${modelId}/fits/99999/score-tests`).set(bearer(stats))).status).toBe(404);
  });
});
