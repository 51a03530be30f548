/**
 * Re-fit studies through the API, on the demo study (24 crew, 3 waves): starting one from a fit,
 * progress, the summaries checked against numpy on the exported per-re-fit CSV
 * (tests/refits/reference_summary.py: mean, sample SD, mean SE, coverage, Pearson r), CSV cells that
 * would be read as formulas neutralised, roles, cancel, and bad requests that must store nothing.
 */
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RefitResults, RefitSummary } from '../../shared/refits';
import { stopJobQueue } from '../../server/jobs';
import { runPython } from '../gof/python';
import { LEAD, REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let lead: string;
let stats: string;
let reviewer: string;
let studyId: number;
let fitA: number;
let fitB: number;
const base = () => `/api/studies/${studyId}/refits`;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function fixedFit(name: string, effects: { id: string; value: number }[]): Promise<number> {
  const model = await request(t.app)
    .post(`/api/studies/${studyId}/models`)
    .set(bearer(stats))
    .send({ name, rates: [{ period: 1, estimate: true, value: 2.5 }], effects: effects.map((e) => ({ ...e, estimate: true })) });
  expect(model.status).toBe(201);
  const fit = await request(t.app).post(`/api/studies/${studyId}/models/${model.body.model.id}/fits`).set(bearer(stats)).send({ mode: 'fixed' });
  expect(fit.status).toBe(201);
  return fit.body.fit.id as number;
}

async function waitEnded(id: number): Promise<RefitSummary> {
  for (let i = 0; i < 1200; i++) {
    const res = await request(t.app).get(`${base()}/${id}`).set(bearer(lead));
    expect(res.status).toBe(200);
    const r = res.body.refit as RefitSummary;
    if (r.state === 'done' || r.state === 'failed' || r.state === 'cancelled') return r;
    await sleep(100);
  }
  throw new Error('re-fit study did not finish');
}

beforeAll(async () => {
  t = await makeTestApp();
  lead = await t.tokenFor(LEAD);
  stats = await t.tokenFor(STATS);
  reviewer = await t.tokenFor(REVIEWER);
  studyId = t.seed.studyId;
  fitA = await fixedFit('=HYPERLINK("x") reciprocity', [
    { id: 'density', value: -2.2 },
    { id: 'reciprocity', value: 1.6 },
  ]);
  fitB = await fixedFit('Density only', [{ id: 'density', value: -1.5 }]);
});
afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
});

describe('re-fit studies API', () => {
  it('refuses bad requests with a clear message and stores nothing', async () => {
    const before = await t.counts('refits', 'jobs');
    const cases: [object, number, RegExp][] = [
      [{ fitIds: [fitA], replications: 10 }, 400, /at least 20/],
      [{ fitIds: [fitA], replications: 5000 }, 400, /at most 1000/],
      [{ fitIds: [], replications: 20 }, 400, /at least one fit/],
      [{ fitIds: [fitA, fitA], replications: 20 }, 400, /listed twice/],
      [{ fitIds: [1, 2, 3, 4, 5], replications: 20 }, 400, /at most 4/],
      [{ fitIds: [999999], replications: 20 }, 404, /Fit 999999 not found/],
      [{ fitIds: 'all', replications: 20 }, 400, /list of fit ids/],
    ];
    for (const [body, status, message] of cases) {
      const res = await request(t.app).post(base()).set(bearer(stats)).send(body);
      expect(res.status, JSON.stringify(body)).toBe(status);
      expect(res.body.error.message).toMatch(message);
    }
    // A reviewer may read but not start a study.
    const res = await request(t.app).post(base()).set(bearer(reviewer)).send({ fitIds: [fitA], replications: 20 });
    expect(res.status).toBe(403);
    expect(await t.counts('refits', 'jobs')).toEqual(before);
  });

  it('runs a cross study of two fits; summaries agree with numpy on the exported re-fits', async () => {
    const created = await request(t.app).post(base()).set(bearer(lead)).send({ fitIds: [fitA, fitB], replications: 20, cross: true, seed: 5, phase3Runs: 50 });
    expect(created.status).toBe(201);
    const id = created.body.refit.id as number;
    expect(created.body.refit.refitsTotal).toBe(80);
    const early = await request(t.app).get(`${base()}/${id}/results`).set(bearer(reviewer));
    if (early.status !== 200) expect(early.body.error.code).toBe('refit_not_ready');
    const done = await waitEnded(id);
    expect(done.state).toBe('done');
    expect(done.refitsDone).toBe(80);

    const res = await request(t.app).get(`${base()}/${id}/results?include=all`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    const results = res.body as RefitResults;
    expect(results.groups.map((g) => [g.source, g.target])).toEqual([[0, 0], [0, 1], [1, 0], [1, 1]]);
    // Density-only model fitted to panels of the model with reciprocity: reciprocity's truth there is
    // 1.6; the reciprocity model fitted to density-only panels: reciprocity's truth is 0.
    const g10 = results.groups.find((g) => g.source === 1 && g.target === 0)!;
    expect(g10.parameters.find((q) => q.key === 'reciprocity')!.truth).toBe(0);

    const each = await request(t.app).get(`${base()}/${id}/results.csv?rows=each&include=all`).set(bearer(reviewer));
    expect(each.status).toBe(200);
    expect(each.headers['content-type']).toMatch(/text\/csv/);
    const lines = each.text.trim().split('\r\n');
    // The model name that starts with "=" is neutralised (a leading apostrophe, then quoted).
    expect(each.text).toContain(`"'=HYPERLINK(""x"") reciprocity (fit ${fitA})"`);
    expect(each.text).not.toMatch(/(^|,)=HYPERLINK/m);
    // Reference: group (0, 0) from the per-re-fit rows, with numpy.
    const g00 = results.groups[0];
    const splitCsv = (l: string) => l.match(/("([^"]|"")*"|[^,]*)(,|$)/g)!.map((c) => c.replace(/,$/, ''));
    const parsed = lines.slice(1).map(splitCsv);
    const nameA = `"'=HYPERLINK(""x"") reciprocity (fit ${fitA})"`;
    const mine = parsed.filter((c) => c[1] === nameA && c[2] === nameA && c[4] === '1');
    const params = g00.parameters.map((q) => ({
      truth: q.truth,
      rows: mine.filter((c) => c[6] === q.key).map((c) => [Number(c[7]), Number(c[8])]),
    }));
    const pairs = [[g00.parameters[1].estimates, g00.parameters[2].estimates]];
    const ref = runPython<{ params: { bias: number; sd: number; meanSe: number; coverage: number }[]; corr: number[] }>(join(__dirname, '../refits/reference_summary.py'), { params, pairs });
    g00.parameters.forEach((q, k) => {
      expect(q.count).toBe(params[k].rows.length);
      expect(q.bias.value!).toBeCloseTo(ref.params[k].bias, 9);
      expect(q.sd.value!).toBeCloseTo(ref.params[k].sd, 9);
      expect(q.meanSe.value!).toBeCloseTo(ref.params[k].meanSe, 9);
      expect(q.coverage.value!).toBeCloseTo(ref.params[k].coverage, 12);
      expect(q.bias.mcError!).toBeCloseTo(ref.params[k].sd / Math.sqrt(q.count), 9);
    });
    const corr = g00.correlations.find((c) => c.a === g00.parameters[1].key && c.b === g00.parameters[2].key)!;
    expect(corr.r!).toBeCloseTo(ref.corr[0], 9);
    expect(corr.flagged).toBe(Math.abs(ref.corr[0]) > 0.9);

    // The summary CSV: one row per group and parameter, numbers as in the JSON.
    const summary = await request(t.app).get(`${base()}/${id}/results.csv?include=all`).set(bearer(reviewer));
    const srows = summary.text.trim().split('\r\n');
    expect(srows.length).toBe(1 + results.groups.reduce((s, g) => s + g.parameters.length, 0));
    expect(srows[0]).toMatch(/^refit_study,source_model,fitted_model,parameter,label,truth/);

    // Same seed, same study.
    const again = await request(t.app).post(base()).set(bearer(stats)).send({ fitIds: [fitA], replications: 20, seed: 5, phase3Runs: 50 });
    const done2 = await waitEnded(again.body.refit.id);
    expect(done2.state).toBe('done');
    const r2 = (await request(t.app).get(`${base()}/${again.body.refit.id}/results?include=all`).set(bearer(lead))).body as RefitResults;
    expect(r2.groups[0].parameters.map((q) => q.estimates)).toEqual(g00.parameters.map((q) => q.estimates));
    const bad = await request(t.app).get(`${base()}/${id}/results?include=some`).set(bearer(lead));
    expect(bad.status).toBe(400);
  });

  it('the fit report includes a re-fit study when asked (JSON and PDF); a foreign or malformed id is refused', async () => {
    const list = (await request(t.app).get(base()).set(bearer(lead))).body.refits as RefitSummary[];
    const done = list.find((r) => r.state === 'done')!;
    const batch = await request(t.app).post(`/api/studies/${studyId}/batches`).set(bearer(stats)).send({ fitId: fitA, chains: 20, seed: 3, statistics: ['outdegree_distribution'] });
    expect(batch.status).toBe(201);
    const batchId = batch.body.batch.id as number;
    for (let i = 0; i < 300; i++) {
      const b = await request(t.app).get(`/api/studies/${studyId}/batches/${batchId}`).set(bearer(lead));
      if (b.body.batch.state === 'done') break;
      await sleep(100);
    }
    const plain = await request(t.app).get(`/api/studies/${studyId}/batches/${batchId}/report.json`).set(bearer(lead));
    expect(plain.status).toBe(200);
    expect(plain.body.refitStudy).toBeNull();
    const withRefit = await request(t.app).get(`/api/studies/${studyId}/batches/${batchId}/report.json?refit=${done.id}`).set(bearer(lead));
    expect(withRefit.status).toBe(200);
    expect(withRefit.body.refitStudy.refit.id).toBe(done.id);
    expect(withRefit.body.refitStudy.include).toBe('converged');
    expect(withRefit.body.refitStudy.groups.length).toBeGreaterThan(0);
    const pdfPlain = await request(t.app).get(`/api/studies/${studyId}/batches/${batchId}/report.pdf`).set(bearer(lead)).buffer(true);
    const pdf = await request(t.app).get(`/api/studies/${studyId}/batches/${batchId}/report.pdf?refit=${done.id}`).set(bearer(lead)).buffer(true);
    expect(pdf.status).toBe(200);
    expect(pdf.headers['content-type']).toMatch(/application\/pdf/);
    expect(Number(pdf.headers['content-length'] ?? pdf.body.length)).toBeGreaterThan(Number(pdfPlain.headers['content-length'] ?? pdfPlain.body.length));
    for (const bad of ['abc', '999999']) {
      const res = await request(t.app).get(`/api/studies/${studyId}/batches/${batchId}/report.json?refit=${bad}`).set(bearer(lead));
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(/re-fit study/i);
    }
  });

  it('cancels a running study; a reviewer may not; the re-fits done so far carry a caution', async () => {
    const created = await request(t.app).post(base()).set(bearer(stats)).send({ fitIds: [fitA], replications: 400, seed: 8, phase3Runs: 50 });
    const id = created.body.refit.id as number;
    for (let i = 0; i < 600; i++) {
      const r = (await request(t.app).get(`${base()}/${id}`).set(bearer(lead))).body.refit as RefitSummary;
      if (r.refitsDone >= 2) break;
      await sleep(100);
    }
    const refused = await request(t.app).post(`${base()}/${id}/cancel`).set(bearer(reviewer));
    expect(refused.status).toBe(403);
    const cancel = await request(t.app).post(`${base()}/${id}/cancel`).set(bearer(lead));
    expect(cancel.status).toBe(200);
    expect(cancel.body.refit.state).toBe('cancelled');
    const twice = await request(t.app).post(`${base()}/${id}/cancel`).set(bearer(lead));
    expect(twice.status).toBe(409);
    const res = await request(t.app).get(`${base()}/${id}/results?include=all`).set(bearer(lead));
    expect(res.status).toBe(200);
    expect(res.body.groups[0].cautions[0]).toMatch(/was cancelled after \d+ of 400 re-fits/);
    const list = await request(t.app).get(base()).set(bearer(reviewer));
    expect(list.status).toBe(200);
    expect(list.body.refits.length).toBeGreaterThanOrEqual(3);
  });
});
