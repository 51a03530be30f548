/**
 * The fit report through the API: the lead's sign-off (who and when; other roles 403, non-members
 * 404; the team notified as their preferences allow), and the exports. The PDF is read back with
 * poppler's pdftotext and pdffonts (Debian poppler-utils), so the check does not trust our own
 * writer: every statistic's section must carry its p-value (as the batches module's /gof endpoint
 * gives it, to three decimals, common practice) and its verdict, the signer and the seed; its fonts
 * must be embedded. The CSV is parsed with Python's csv module (RFC 4180) and compared with /gof.
 * The sign-off guard: a batch with fewer chains than FEW_CHAINS (or of a fit that did not converge)
 * is signed off only with an acknowledged reason (400 acknowledgement_required without one, nothing
 * stored), and the reason is printed in the PDF and carried in the CSV and JSON; a batch without
 * concerns signs off with no reason.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BatchDetail, GofResponse } from '../../shared/batches';
import type { ReportJson, ReportStatus } from '../../shared/review';
import { hashPassword } from '../../server/auth/passwords';
import { UserEntity } from '../../server/auth/entities';
import { stopJobQueue } from '../../server/jobs';
import { LEAD, REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let lead: string;
let stats: string;
let reviewer: string;
let outsider: string;
let studyId: number;
let batchId: number;
let otherBatch: number;
let dir: string;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const B = (id: number) => `/api/studies/${studyId}/batches/${id}`;

async function makeBatch(model: unknown, seed: number, chains = 100): Promise<number> {
  const res = await request(t.app).post(`/api/studies/${studyId}/batches`).set(bearer(stats)).send({ model, chains, seed });
  expect(res.status).toBe(201);
  const id = res.body.batch.id as number;
  for (let i = 0; i < 600; i++) {
    const b = (await request(t.app).get(B(id)).set(bearer(stats))).body.batch as BatchDetail;
    if (b.state === 'done') return id;
    if (b.state === 'failed' || b.state === 'cancelled') throw new Error(`batch ${b.state}`);
    await sleep(100);
  }
  throw new Error('batch did not finish');
}

const binary = (res: request.Response, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
};

function poppler(tool: string, args: string[]): string {
  const r = spawnSync(tool, args, { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${tool} failed: ${r.stderr || r.error?.message}`);
  return r.stdout;
}

beforeAll(async () => {
  t = await makeTestApp();
  studyId = t.seed.studyId;
  [lead, stats, reviewer] = await Promise.all([t.tokenFor(LEAD), t.tokenFor(STATS), t.tokenFor(REVIEWER)]);
  await t.dataSource.getRepository(UserEntity).save({ email: 'outsider@harbourside.example', name: 'Out Sider', passwordHash: await hashPassword('outsider-pass-1', t.config.passwordHash), isAdmin: false });
  outsider = await t.tokenFor('outsider@harbourside.example', 'outsider-pass-1');
  batchId = await makeBatch(
    {
      rates: [2.5, 2.5],
      effects: [
        { id: 'density', value: -2.2 },
        { id: 'reciprocity', value: 1.6 },
        { id: 'same_covariate', covariate: 'watch', value: 0.9 },
      ],
    },
    31,
  );
  otherBatch = await makeBatch({ rates: [2.5, 2.5], effects: [{ id: 'density', value: -1.8 }] }, 32);
  // Two verdicts and a comment, so the report has something of each kind.
  const post = (body: object) => request(t.app).post(`${B(batchId)}/verdicts`).set(bearer(reviewer)).send(body);
  expect((await post({ statistic: 'triad_census', period: 1, verdict: 'fail', note: 'Far too few transitive triads.', version: 0 })).status).toBe(201);
  expect((await post({ statistic: 'outdegree_distribution', period: 2, verdict: 'pass', version: 0 })).status).toBe(201);
  await request(t.app).post(`${B(batchId)}/comments`).set(bearer(stats)).send({ statistic: 'triad_census', period: 1, body: 'Add transitive triplets next.' });
  dir = mkdtempSync(join(tmpdir(), 'wavefit-report-'));
});

afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('sign-off', () => {
  it('only a lead signs (reviewer and statistician 403, non-member 404); a refused sign-off stores nothing', async () => {
    expect((await request(t.app).post(`${B(batchId)}/report/signoff`).set(bearer(reviewer)).send({})).status).toBe(403);
    expect((await request(t.app).post(`${B(batchId)}/report/signoff`).set(bearer(stats)).send({})).status).toBe(403);
    expect((await request(t.app).post(`${B(batchId)}/report/signoff`).set(bearer(outsider)).send({})).status).toBe(404);
    const long = await request(t.app).post(`${B(batchId)}/report/signoff`).set(bearer(lead)).send({ note: 'x'.repeat(2001) });
    expect(long.status).toBe(400);
    expect(await t.counts('report_signoffs')).toEqual({ report_signoffs: 0 });
    const status = (await request(t.app).get(`${B(batchId)}/report`).set(bearer(reviewer))).body as ReportStatus;
    expect(status).toMatchObject({ signoffs: [], canSign: false, changedSinceSignoff: false });
  });

  it('the lead signs off: who and when are recorded, and members who want it are told by e-mail', async () => {
    await request(t.app).patch('/api/me/notifications').set(bearer(reviewer)).send({ reportSigned: false });
    t.mailer.clear();
    const before = Date.now();
    // 100 chains are fewer than the few-chains caution (500): the report lists the concern.
    const pending = (await request(t.app).get(`${B(batchId)}/report`).set(bearer(lead))).body as ReportStatus;
    expect(pending.concerns.map((c) => c.code)).toEqual(['few_chains']);
    expect(pending.concerns[0].message).toMatch(/100 chains, fewer than 500/);
    // Without an acknowledgement, or with a reason too short, nothing is stored.
    const refused = await request(t.app).post(`${B(batchId)}/report/signoff`).set(bearer(lead)).send({ note: 'Good enough for the station report.' });
    expect(refused.status).toBe(400);
    expect(refused.body.error.code).toBe('acknowledgement_required');
    expect(refused.body.error.message).toMatch(/acknowledgement with a reason.*100 chains/);
    expect(refused.body.error.details.concerns).toEqual(pending.concerns);
    const short = await request(t.app).post(`${B(batchId)}/report/signoff`).set(bearer(lead)).send({ note: 'x', acknowledgement: { reason: 'ok' } });
    expect(short.status).toBe(400);
    expect(short.body.error.message).toMatch(/at least 10 characters/);
    const blank = await request(t.app).post(`${B(batchId)}/report/signoff`).set(bearer(lead)).send({ acknowledgement: { reason: '           ' } });
    expect(blank.status).toBe(400);
    expect(await t.counts('report_signoffs')).toEqual({ report_signoffs: 0 });
    expect(t.mailer.messages()).toEqual([]);

    const reason = 'A pilot check for the crew meeting; the 1000-chain run follows next week.';
    const res = await request(t.app).post(`${B(batchId)}/report/signoff`).set(bearer(lead)).send({ note: 'Good enough for the station report.', acknowledgement: { reason } });
    expect(res.status).toBe(201);
    expect(res.body.signoff).toMatchObject({
      signedBy: { name: 'Ines Varga' },
      note: 'Good enough for the station report.',
      counts: { pass: 1, fail: 1, unsure: 0, awaiting: 8, total: 10 },
      acknowledgement: { concerns: pending.concerns, reason },
    });
    const at = Date.parse(res.body.signoff.signedAt);
    expect(at).toBeGreaterThanOrEqual(before - 1000);
    expect(at).toBeLessThanOrEqual(Date.now() + 1000);
    expect(t.mailer.messages().map((m) => m.to)).toEqual([STATS]);
    expect(t.mailer.messages()[0].subject).toMatch(/^Fit report signed off/);
    const status = (await request(t.app).get(`${B(batchId)}/report`).set(bearer(lead))).body as ReportStatus;
    expect(status.canSign).toBe(true);
    expect(status.signoffs).toHaveLength(1);
    expect(status.changedSinceSignoff).toBe(false);
    expect(status.signoffs[0].acknowledgement?.reason).toBe(reason);
  });

  it('a batch without concerns (enough chains, no failed convergence check) signs off as before, with no reason', async () => {
    const enough = await makeBatch({ rates: [2.5, 2.5], effects: [{ id: 'density', value: -1.8 }] }, 33, 500);
    const status = (await request(t.app).get(`${B(enough)}/report`).set(bearer(lead))).body as ReportStatus;
    expect(status.concerns).toEqual([]);
    const res = await request(t.app).post(`${B(enough)}/report/signoff`).set(bearer(lead)).send({ note: 'Fine.' });
    expect(res.status).toBe(201);
    expect(res.body.signoff.acknowledgement).toBeNull();
  });

  it('a fit that did not converge is a concern too', async () => {
    // A hand-entered fit of the demo model, then its stored results marked as a failed convergence check.
    const model = await request(t.app)
      .post(`/api/studies/${studyId}/models`)
      .set(bearer(stats))
      .send({ name: 'Density only', rates: [1, 2].map((period) => ({ period, estimate: false, value: 2.5 })), effects: [{ id: 'density', value: -1.8, estimate: false }] });
    expect(model.status).toBe(201);
    const fit = await request(t.app).post(`/api/studies/${studyId}/models/${model.body.model.id}/fits`).set(bearer(stats)).send({ mode: 'fixed' });
    expect(fit.status).toBe(201);
    const fitId = fit.body.fit.id as number;
    const stored = (await t.dataSource.query(`SELECT "results" FROM "fits" WHERE "id" = ?`, [fitId])) as { results: string }[];
    await t.dataSource.query(`UPDATE "fits" SET "results" = ? WHERE "id" = ?`, [JSON.stringify({ ...JSON.parse(stored[0].results), maxAbsT: 0.31, tauMax: 0.42, converged: false }), fitId]);
    const res = await request(t.app).post(`/api/studies/${studyId}/batches`).set(bearer(stats)).send({ fitId, chains: 500, seed: 34 });
    expect(res.status).toBe(201);
    const id = res.body.batch.id as number;
    for (let i = 0; i < 600; i++) {
      if (((await request(t.app).get(B(id)).set(bearer(stats))).body.batch as BatchDetail).state === 'done') break;
      await sleep(100);
    }
    const status = (await request(t.app).get(`${B(id)}/report`).set(bearer(lead))).body as ReportStatus;
    expect(status.concerns.map((c) => c.code)).toEqual(['not_converged']);
    expect(status.concerns[0].message).toMatch(/did not converge \(largest \|t\| 0\.310, overall ratio 0\.420\)/);
    expect((await request(t.app).post(`${B(id)}/report/signoff`).set(bearer(lead)).send({})).body.error.code).toBe('acknowledgement_required');
  });
});

describe('exports', () => {
  let pdfText = '';

  it('the PDF has every statistic with its p-value and verdict, the sign-off, the seed and the versions, in embedded fonts', async () => {
    const res = await request(t.app).get(`${B(batchId)}/report.pdf?compare=${otherBatch}`).set(bearer(reviewer)).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const file = join(dir, 'report.pdf');
    writeFileSync(file, res.body as Buffer);
    pdfText = poppler('pdftotext', [file, '-']).replace(/\u00a0/g, ' ');

    const report = (await request(t.app).get(`${B(batchId)}/report.json`).set(bearer(reviewer))).body as ReportJson;
    const sections = report.statistics.map((s) => ({ s, heading: `${s.label}, period ${s.period}` }));
    for (let k = 0; k < sections.length; k++) {
      const { s, heading } = sections[k];
      const start = pdfText.indexOf(heading);
      expect(start, heading).toBeGreaterThan(-1);
      const end = k + 1 < sections.length ? pdfText.indexOf(sections[k + 1].heading, start + 1) : pdfText.indexOf('Comparison of models');
      const section = pdfText.slice(start, end);
      // The p-value as the batches module computes it (its own endpoint), printed to three decimals.
      const gof = (await request(t.app).get(`${B(batchId)}/gof?statistic=${s.statistic}&period=${s.period}`).set(bearer(reviewer))).body as GofResponse;
      const p = gof.test.pValue < 0.001 ? gof.test.pValue.toExponential(1) : gof.test.pValue.toFixed(3);
      expect(section, heading).toContain(`p = ${p}`);
      const expectedVerdict =
        s.statistic === 'triad_census' && s.period === 1 ? 'Verdict: Fail' : s.statistic === 'outdegree_distribution' && s.period === 2 ? 'Verdict: Pass' : 'Verdict: awaiting review';
      expect(section, heading).toContain(expectedVerdict);
    }
    expect(pdfText).toContain('Far too few transitive triads.');
    expect(pdfText).toContain('Add transitive triplets next.');
    expect(pdfText).toMatch(/Signed off by Ines Varga on \d{1,2} \w+ \d{4}, \d{2}:\d{2} UTC/);
    expect(pdfText).toContain('Good enough for the station report.');
    // The acknowledged concern and the reason, as pdftotext reads them (lines joined).
    const flat = pdfText.replace(/\s+/g, ' ');
    expect(flat).toContain('Signed off despite these concerns:');
    expect(flat).toContain('The batch ran 100 chains, fewer than 500');
    expect(flat).toContain('Reason given: “A pilot check for the crew meeting; the 1000-chain run follows next week.”');
    expect(report.signoffs[0].acknowledgement?.reason).toBe('A pilot check for the crew meeting; the 1000-chain run follows next week.');
    expect(pdfText).toContain('Comparison of models');
    // The comparison's honest marks: convergence per model, p ± Monte Carlo SE, the overall lines and the caution.
    const cmpText = flat.slice(flat.indexOf('Comparison of models'));
    expect(cmpText).toContain('Fit converged');
    expect(cmpText).toMatch(/p = \S+ ± \d\.\d{3}/);
    expect(cmpText).toContain('Failing at 0.05');
    expect(cmpText).toContain('Summed distance');
    expect(cmpText).toContain('not independent');
    expect(cmpText).toContain('2 combined Monte Carlo standard errors');
    if (process.env.WAVEFIT_KEEP_PDF) writeFileSync(process.env.WAVEFIT_KEEP_PDF, res.body as Buffer);
    expect(pdfText).toContain('Batch seed');
    expect(pdfText).toContain('31');
    expect(pdfText).toContain(process.version);
    expect(pdfText).toMatch(/pdfkit \d+\.\d+\.\d+/);

    const fonts = poppler('pdffonts', [file]);
    const rows = fonts.split('\n').slice(2).filter((l) => l.trim());
    expect(rows.length).toBeGreaterThanOrEqual(3);
    for (const row of rows) {
      expect(row).toMatch(/AtkinsonHyperlegible|IBMPlexMono/);
      expect(row).toMatch(/ yes +yes +yes /); // embedded, subset, with a Unicode map
    }
  });

  it('a verdict changed after the sign-off is called out in the report', async () => {
    await sleep(1100);
    const res = await request(t.app).post(`${B(batchId)}/verdicts`).set(bearer(reviewer)).send({ statistic: 'triad_census', period: 2, verdict: 'unsure', version: 0 });
    expect(res.status).toBe(201);
    const status = (await request(t.app).get(`${B(batchId)}/report`).set(bearer(lead))).body as ReportStatus;
    expect(status.changedSinceSignoff).toBe(true);
    const pdf = await request(t.app).get(`${B(batchId)}/report.pdf`).set(bearer(lead)).buffer(true).parse(binary);
    const file = join(dir, 'report2.pdf');
    writeFileSync(file, pdf.body as Buffer);
    expect(poppler('pdftotext', [file, '-']).replace(/\s+/g, ' ')).toContain('verdicts or comments changed after this sign-off');
  });

  it('the CSV parses with Python (RFC 4180) and its numbers equal the GOF endpoint', async () => {
    const res = await request(t.app).get(`${B(batchId)}/report.csv`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    const file = join(dir, 'report.csv');
    writeFileSync(file, res.text);
    const py = spawnSync('/usr/bin/python3', ['-c', 'import csv,json,sys; print(json.dumps(list(csv.DictReader(open(sys.argv[1], newline="")))))', file], { encoding: 'utf8' });
    expect(py.status, py.stderr).toBe(0);
    const rows = JSON.parse(py.stdout) as Record<string, string>[];
    const gof = (await request(t.app).get(`${B(batchId)}/gof?statistic=triad_census&period=1`).set(bearer(reviewer))).body as GofResponse;
    const triad = rows.filter((r) => r.statistic === 'triad_census' && r.period === '1');
    expect(triad.map((r) => r.component)).toEqual(gof.components);
    triad.forEach((r, k) => {
      expect(Number(r.observed)).toBe(gof.observed[k]);
      expect(Number(r.simulated_mean)).toBeCloseTo(gof.mean[k], 12);
      expect(Number(r.band90_lower)).toBe(gof.bands.find((b) => b.coverage === 0.9)!.lower[k]);
      expect(Number(r.p_value)).toBe(gof.test.pValue);
      expect(r.verdict).toBe('fail');
      expect(r.verdict_note).toBe('Far too few transitive triads.');
      expect(r.signed_off_by).toBe('Ines Varga');
      expect(r.signoff_reason).toBe('A pilot check for the crew meeting; the 1000-chain run follows next week.');
      expect(r.signoff_concerns).toMatch(/100 chains, fewer than 500/);
    });
    const est = await request(t.app).get(`${B(batchId)}/report.csv?table=estimates`).set(bearer(reviewer));
    expect(est.text.split('\r\n')[0]).toBe('batch,fit,parameter,label,value,standard_error,convergence_t');
    expect(est.text).toContain('same_covariate:watch,Same category (watch),0.9,,');
  });

  it('bad export requests get a clear 400 (or 404 outside the study)', async () => {
    const bad = await request(t.app).get(`${B(batchId)}/report.csv?table=everything`).set(bearer(reviewer));
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/"gof".*"estimates"/);
    expect((await request(t.app).get(`${B(batchId)}/report.pdf?compare=x`).set(bearer(reviewer))).status).toBe(400);
    expect((await request(t.app).get(`${B(batchId)}/report.pdf`).set(bearer(outsider))).status).toBe(404);
    expect((await request(t.app).get(`${B(9999)}/report.json`).set(bearer(reviewer))).status).toBe(404);
  });
});
