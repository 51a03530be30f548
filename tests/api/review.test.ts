/**
 * The review board through the API, on the demo study: who may record verdicts (members with the
 * review ability; non-members get 404, roles without an ability 403), the verdict history (who,
 * when, old and new), optimistic concurrency (two clients with the same version: the second gets
 * 409 with the current verdict and nothing is lost), comments, review requests with their e-mails
 * and the inbox, notification preferences (default on, respected for every kind), the comparison of
 * two models, and bad input that must store nothing.
 *
 * Outside references: the p-values the board and the comparison show must equal the batches
 * module's own /gof endpoint (checked there against numpy); the roles are those of shared/api.ts
 * ROLE_ABILITIES. The comparison's marks: t = estimate / SE against the normal quantiles 1.96 and 2.576
 * (scipy.stats.norm.ppf, Debian's scipy), the Monte Carlo standard error of a p-value from N chains
 * sqrt(p(1 - p) / N) (the binomial standard deviation over N, scipy.stats.binom.std; Davison & Hinkley
 * 1997, Bootstrap Methods and their Application, section 4.2.5), and "better" only beyond twice the
 * combined Monte Carlo error (our stated rule, common practice for comparing two Monte Carlo estimates).
 */
import { spawnSync } from 'node:child_process';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROLE_ABILITIES } from '../../shared/api';
import type { BatchDetail, ConsensusResponse, GofResponse } from '../../shared/batches';
import type { StudyDataResponse, WaveTiesResponse } from '../../shared/data';
import { classifyTies, countKinds } from '../../features/consensus/classify';
import type { BoardResponse, CompareResponse, ConsensusLayoutDto, InboxResponse, ReviewRequestDto, VerdictChange, VerdictConflictDetails, VerdictDto } from '../../shared/review';
import { hashPassword } from '../../server/auth/passwords';
import { MembershipEntity } from '../../server/team/entities';
import { StudyEntity } from '../../server/studies/entities';
import { UserEntity } from '../../server/auth/entities';
import { stopJobQueue } from '../../server/jobs';
import { ADMIN, LEAD, REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let lead: string;
let stats: string;
let reviewer: string;
let outsider: string;
let admin: string;
let studyId: number;
let batchA: number;
let batchB: number;
let fitA: number;
let fitB: number;
let ids: Record<'lead' | 'stats' | 'reviewer', number>;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const B = (batch: number) => `/api/studies/${studyId}/batches/${batch}`;

async function waitDone(id: number): Promise<BatchDetail> {
  for (let i = 0; i < 600; i++) {
    const res = await request(t.app).get(B(id)).set(bearer(stats));
    const batch = res.body.batch as BatchDetail;
    if (!['queued', 'running'].includes(batch.state)) return batch;
    await sleep(100);
  }
  throw new Error('batch did not finish');
}

/** A fit with values entered by hand (no estimation), through the models API. */
async function fixedFit(name: string, effects: { id: string; covariate?: string; value: number }[]): Promise<number> {
  const model = await request(t.app)
    .post(`/api/studies/${studyId}/models`)
    .set(bearer(stats))
    .send({
      name,
      rates: [
        { period: 1, estimate: false, value: 2.5 },
        { period: 2, estimate: false, value: 2.5 },
      ],
      effects: effects.map((e) => ({ ...e, estimate: false })),
    });
  expect(model.status).toBe(201);
  const fit = await request(t.app).post(`/api/studies/${studyId}/models/${model.body.model.id}/fits`).set(bearer(stats)).send({ mode: 'fixed' });
  expect(fit.status).toBe(201);
  return fit.body.fit.id as number;
}

async function batchOf(fitId: number, seed: number): Promise<number> {
  const res = await request(t.app).post(`/api/studies/${studyId}/batches`).set(bearer(stats)).send({ fitId, chains: 100, seed });
  expect(res.status).toBe(201);
  return res.body.batch.id as number;
}

const tables = ['verdicts', 'verdict_history', 'review_comments', 'review_requests', 'notification_events'];

beforeAll(async () => {
  t = await makeTestApp();
  studyId = t.seed.studyId;
  [lead, stats, reviewer, admin] = await Promise.all([t.tokenFor(LEAD), t.tokenFor(STATS), t.tokenFor(REVIEWER), t.tokenFor(ADMIN)]);
  const users = t.dataSource.getRepository(UserEntity);
  const byEmail = async (email: string) => (await users.findOneByOrFail({ email })).id;
  ids = { lead: await byEmail(LEAD), stats: await byEmail(STATS), reviewer: await byEmail(REVIEWER) };
  await users.save({ email: 'outsider@harbourside.example', name: 'Out Sider', passwordHash: await hashPassword('outsider-pass-1', t.config.passwordHash), isAdmin: false });
  outsider = await t.tokenFor('outsider@harbourside.example', 'outsider-pass-1');
  const other = await t.dataSource.getRepository(StudyEntity).save({ name: 'Another station', description: '' });
  await t.dataSource.getRepository(MembershipEntity).insert({ userId: await byEmail('outsider@harbourside.example'), studyId: other.id, role: 'lead' });

  fitA = await fixedFit('Structure only', [
    { id: 'density', value: -1.9 },
    { id: 'reciprocity', value: 1.4 },
  ]);
  fitB = await fixedFit('Structure and watch', [
    { id: 'density', value: -2.2 },
    { id: 'reciprocity', value: 1.6 },
    { id: 'transitive_triplets', value: 0.3 },
    { id: 'same_covariate', covariate: 'watch', value: 0.9 },
  ]);
  batchA = await batchOf(fitA, 11);
  batchB = await batchOf(fitB, 12);
  expect((await waitDone(batchA)).state).toBe('done');
  expect((await waitDone(batchB)).state).toBe('done');
  // Let the "batch finished" e-mails go out before the tests look at the outbox.
  await sleep(50);
});

afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
});

const verdict = (token: string, body: Record<string, unknown>, batch = batchB) => request(t.app).post(`${B(batch)}/verdicts`).set(bearer(token)).send(body);

describe('the board', () => {
  it('has one card per statistic and period, all awaiting review, and p-values equal to the batch GOF endpoint', async () => {
    const res = await request(t.app).get(`${B(batchB)}/board`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    const board = res.body as BoardResponse;
    expect(board.periods).toEqual([1, 2]);
    expect(board.cards).toHaveLength(5 * 2);
    expect(board.counts).toEqual({ pass: 0, fail: 0, unsure: 0, awaiting: 10, total: 10 });
    const chart = await request(t.app).get(`${B(batchB)}/board/chart?statistic=triad_census&period=2`).set(bearer(reviewer));
    const gof = await request(t.app).get(`${B(batchB)}/gof?statistic=triad_census&period=2`).set(bearer(reviewer));
    expect(chart.status).toBe(200);
    const g = gof.body as GofResponse;
    expect(chart.body).toMatchObject({ pValue: g.test.pValue, observed: g.observed, components: g.components, reading: g.reading, caution: g.caution, scale: 'standardised' });
    // The standard deviation is the sample one (n - 1): the 90% band cannot be wider than the range, and sd > 0 where the band has width.
    expect(chart.body.sd).toHaveLength(16);
  });

  it('refuses a non-member with 404 and an unknown card with 404', async () => {
    expect((await request(t.app).get(`${B(batchB)}/board`).set(bearer(outsider))).status).toBe(404);
    expect((await verdict(outsider, { statistic: 'triad_census', period: 1, verdict: 'pass', version: 0 })).status).toBe(404);
    expect((await request(t.app).get(`/api/studies/${studyId}/batches/99999/board`).set(bearer(reviewer))).status).toBe(404);
    const res = await verdict(reviewer, { statistic: 'triad_census', period: 7, verdict: 'pass', version: 0 });
    expect(res.status).toBe(404);
    expect(res.body.error.message).toMatch(/no statistic "triad_census" in period 7/);
  });
});

describe('verdicts', () => {
  it('every study role has the review ability (shared/api.ts), so reviewer, statistician and lead may record verdicts', () => {
    expect([...ROLE_ABILITIES.review].sort()).toEqual(['lead', 'reviewer', 'statistician']);
  });

  it('a reviewer records a verdict with a note; the history keeps who, when, old and new', async () => {
    const first = await verdict(reviewer, { statistic: 'triad_census', period: 1, verdict: 'unsure', note: 'Few 030T triads.', version: 0 });
    expect(first.status).toBe(201);
    const v1 = first.body.verdict as VerdictDto;
    expect(v1).toMatchObject({ statistic: 'triad_census', period: 1, verdict: 'unsure', note: 'Few 030T triads.', version: 1, updatedBy: { id: ids.reviewer, name: 'Aoife Lindqvist' } });
    const second = await verdict(reviewer, { statistic: 'triad_census', period: 1, verdict: 'fail', note: 'Clearly too few 030T.', version: 1 });
    expect(second.status).toBe(200);
    expect(second.body.verdict.version).toBe(2);
    const history = (await request(t.app).get(`${B(batchB)}/verdicts/history?statistic=triad_census&period=1`).set(bearer(lead))).body.history as VerdictChange[];
    expect(history).toHaveLength(2);
    expect(history[0]).toMatchObject({ version: 2, previousVerdict: 'unsure', verdict: 'fail', previousNote: 'Few 030T triads.', note: 'Clearly too few 030T.', by: { name: 'Aoife Lindqvist' } });
    expect(history[1]).toMatchObject({ version: 1, previousVerdict: null, verdict: 'unsure', previousNote: null });
    expect(Date.parse(history[0].at)).toBeGreaterThanOrEqual(Date.parse(history[1].at));
    const board = (await request(t.app).get(`${B(batchB)}/board`).set(bearer(stats))).body as BoardResponse;
    expect(board.counts).toEqual({ pass: 0, fail: 1, unsure: 0, awaiting: 9, total: 10 });
  });

  it('two clients with the same version: the second gets 409 with the current verdict, and nothing is lost', async () => {
    const card = { statistic: 'outdegree_distribution', period: 2 };
    const base = await verdict(stats, { ...card, verdict: 'pass', note: 'Fine.', version: 0 });
    expect(base.status).toBe(201);
    const seen = base.body.verdict.version as number;
    // Sent at the same moment, both from version `seen`.
    const [a, b] = await Promise.all([
      verdict(reviewer, { ...card, verdict: 'fail', note: 'Too many isolates.', version: seen }),
      verdict(lead, { ...card, verdict: 'unsure', note: 'Check the isolates.', version: seen }),
    ]);
    const statuses = [a.status, b.status].sort();
    expect(statuses).toEqual([200, 409]);
    const [won, lost] = a.status === 200 ? [a, b] : [b, a];
    expect(lost.body.error.code).toBe('verdict_conflict');
    const details = lost.body.error.details as VerdictConflictDetails;
    expect(details.sentVersion).toBe(seen);
    expect(details.current).toMatchObject({ version: seen + 1, verdict: won.body.verdict.verdict, note: won.body.verdict.note });
    // The stored verdict is the winner's; the history has the base and the winner, not the loser.
    const history = (await request(t.app).get(`${B(batchB)}/verdicts/history?statistic=outdegree_distribution&period=2`).set(bearer(stats))).body.history as VerdictChange[];
    expect(history.map((h) => h.verdict)).toEqual([won.body.verdict.verdict, 'pass']);
    // The loser looks at the current verdict and saves again from its version: now it is kept, with the winner's as "old".
    const loserToken = lost === a ? reviewer : lead;
    const retry = await verdict(loserToken, { ...card, verdict: 'unsure', note: 'After reading the other view: unsure.', version: details.current!.version });
    expect(retry.status).toBe(200);
    const after = (await request(t.app).get(`${B(batchB)}/verdicts/history?statistic=outdegree_distribution&period=2`).set(bearer(stats))).body.history as VerdictChange[];
    expect(after).toHaveLength(3);
    expect(after[0]).toMatchObject({ previousVerdict: won.body.verdict.verdict, previousNote: won.body.verdict.note, verdict: 'unsure' });
  });

  it('a stale version 0 on a card that has a verdict is refused the same way', async () => {
    const res = await verdict(lead, { statistic: 'triad_census', period: 1, verdict: 'pass', version: 0 });
    expect(res.status).toBe(409);
    expect(res.body.error.details.current.verdict).toBe('fail');
  });

  it('bad input gets a clear 400 and stores nothing', async () => {
    const before = await t.counts(...tables);
    const cases: [Record<string, unknown>, RegExp][] = [
      [{ statistic: 'triad_census', period: 1, verdict: 'maybe', version: 2 }, /"pass", "fail" or "unsure"/],
      [{ statistic: 'clustering', period: 1, verdict: 'pass', version: 0 }, /statistic must be one of/],
      [{ statistic: 'triad_census', period: 1.5, verdict: 'pass', version: 0 }, /whole number/],
      [{ statistic: 'triad_census', period: 1, verdict: 'pass' }, /version/],
      [{ statistic: 'triad_census', period: 1, verdict: 'pass', version: 2, note: 'x'.repeat(2001) }, /at most 2000/],
    ];
    for (const [body, message] of cases) {
      const res = await verdict(reviewer, body);
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
      expect(res.body.error.message).toMatch(message);
    }
    const malformed = await request(t.app).post(`${B(batchB)}/verdicts`).set(bearer(reviewer)).set('Content-Type', 'application/json').send('{"verdict": ');
    expect(malformed.status).toBe(400);
    expect(await t.counts(...tables)).toEqual(before);
  });

  it('a batch that did not finish cannot be reviewed (409 batch_not_ready), and nothing is stored', async () => {
    const res = await request(t.app).post(`/api/studies/${studyId}/batches`).set(bearer(stats)).send({ fitId: fitA, chains: 2000, seed: 99 });
    const id = res.body.batch.id as number;
    await request(t.app).post(`${B(id)}/cancel`).set(bearer(stats));
    expect((await waitDone(id)).state).toBe('cancelled');
    const before = await t.counts(...tables);
    const v = await verdict(reviewer, { statistic: 'triad_census', period: 1, verdict: 'pass', version: 0 }, id);
    expect(v.status).toBe(409);
    expect(v.body.error.code).toBe('batch_not_ready');
    expect(v.body.error.message).toMatch(/cancelled/);
    expect(await t.counts(...tables)).toEqual(before);
  });
});

describe('comments', () => {
  it('members with the review ability add comments to a card thread; an empty comment is refused', async () => {
    const add = await request(t.app).post(`${B(batchB)}/comments`).set(bearer(reviewer)).send({ statistic: 'triad_census', period: 1, body: 'The 030T count is far below the band.' });
    expect(add.status).toBe(201);
    await request(t.app).post(`${B(batchB)}/comments`).set(bearer(lead)).send({ statistic: 'triad_census', period: 1, body: 'Agreed; try adding three-cycles.' });
    const empty = await request(t.app).post(`${B(batchB)}/comments`).set(bearer(lead)).send({ statistic: 'triad_census', period: 1, body: '   ' });
    expect(empty.status).toBe(400);
    const list = await request(t.app).get(`${B(batchB)}/comments?statistic=triad_census&period=1`).set(bearer(stats));
    expect(list.body.comments.map((c: { author: { name: string }; body: string }) => [c.author.name, c.body])).toEqual([
      ['Aoife Lindqvist', 'The 030T count is far below the band.'],
      ['Ines Varga', 'Agreed; try adding three-cycles.'],
    ]);
    const board = (await request(t.app).get(`${B(batchB)}/board`).set(bearer(stats))).body as BoardResponse;
    expect(board.cards.find((c) => c.statistic === 'triad_census' && c.period === 1)!.comments).toBe(2);
  });
});

describe('review requests, the inbox and notifications', () => {
  it('notification preferences default to on; bad changes are refused and change nothing', async () => {
    const res = await request(t.app).get('/api/me/notifications').set(bearer(reviewer));
    expect(res.body.preferences).toEqual({ batchEnded: true, reviewRequested: true, reportSigned: true });
    for (const body of [{ batchEnded: 'yes' }, { sms: true }, {}]) {
      const bad = await request(t.app).patch('/api/me/notifications').set(bearer(reviewer)).send(body);
      expect(bad.status).toBe(400);
    }
    expect((await request(t.app).get('/api/me/notifications').set(bearer(reviewer))).body.preferences).toEqual({ batchEnded: true, reviewRequested: true, reportSigned: true });
  });

  it('sent "batch finished" to every member (all on by default)', () => {
    const finished = t.mailer.messages().filter((m) => m.subject.startsWith('Batch finished'));
    expect(finished.map((m) => m.to).sort()).toEqual([LEAD, LEAD, REVIEWER, REVIEWER, STATS, STATS].sort());
    expect(finished[0].text).toMatch(new RegExp(`/studies/${studyId}/board/\\d+`));
  });

  it('only a lead asks for reviews (a reviewer gets 403); someone outside the study is refused with 400', async () => {
    const denied = await request(t.app).post(`${B(batchB)}/review-requests`).set(bearer(reviewer)).send({ userIds: [ids.stats] });
    expect(denied.status).toBe(403);
    const stranger = await request(t.app).post(`${B(batchB)}/review-requests`).set(bearer(lead)).send({ userIds: [ids.reviewer, 999] });
    expect(stranger.status).toBe(400);
    expect(stranger.body.error.details.fields['userIds.1'][0]).toMatch(/not a member/);
    expect(await t.counts('review_requests')).toEqual({ review_requests: 0 });
  });

  it('a lead asks two members; the one who turned review e-mails off gets none, the other does; both see it in their inbox', async () => {
    const off = await request(t.app).patch('/api/me/notifications').set(bearer(reviewer)).send({ reviewRequested: false });
    expect(off.body.preferences).toEqual({ batchEnded: true, reviewRequested: false, reportSigned: true });
    t.mailer.clear();
    const res = await request(t.app).post(`${B(batchB)}/review-requests`).set(bearer(lead)).send({ userIds: [ids.reviewer, ids.stats], message: 'Triad census first, please.' });
    expect(res.status).toBe(201);
    expect(res.body.asked.sort()).toEqual([ids.reviewer, ids.stats].sort());
    const mails = t.mailer.messages();
    expect(mails.map((m) => m.to)).toEqual([STATS]);
    expect(mails[0].subject).toMatch(/^Review requested/);
    expect(mails[0].text).toContain('Triad census first, please.');
    expect(mails[0].text).toContain('Ines Varga');
    // Asking again does not duplicate an open request.
    const again = await request(t.app).post(`${B(batchB)}/review-requests`).set(bearer(lead)).send({ userIds: [ids.reviewer] });
    expect(again.body.alreadyAsked).toEqual([ids.reviewer]);
    expect(await t.counts('review_requests')).toEqual({ review_requests: 2 });

    const inbox = (await request(t.app).get('/api/me/inbox').set(bearer(reviewer))).body as InboxResponse;
    expect(inbox.items).toHaveLength(1);
    const board = (await request(t.app).get(`${B(batchB)}/board`).set(bearer(reviewer))).body as BoardResponse;
    expect(inbox.items[0]).toMatchObject({ batchLabel: board.batchLabel, total: 10, reviewed: 10 - board.counts.awaiting, request: { requestedBy: { name: 'Ines Varga' }, message: 'Triad census first, please.' } });
    expect((await request(t.app).get('/api/me/inbox').set(bearer(outsider))).body.items).toEqual([]);
  });

  it('only the asked member (or a lead) marks a review done; then it leaves the inbox', async () => {
    const requests = (await request(t.app).get(`${B(batchB)}/review-requests`).set(bearer(reviewer))).body.requests as ReviewRequestDto[];
    const mine = requests.find((r) => r.reviewer.id === ids.reviewer)!;
    const path = `/api/studies/${studyId}/review-requests/${mine.id}/complete`;
    expect((await request(t.app).post(path).set(bearer(stats))).status).toBe(403);
    expect((await request(t.app).post(path).set(bearer(outsider))).status).toBe(404);
    const done = await request(t.app).post(path).set(bearer(reviewer));
    expect(done.status).toBe(200);
    expect(done.body.request.completedAt).not.toBeNull();
    expect((await request(t.app).get('/api/me/inbox').set(bearer(reviewer))).body.items).toEqual([]);
  });

  it('a batch that ends sends "batch finished" only to members who want it', async () => {
    await request(t.app).patch('/api/me/notifications').set(bearer(stats)).send({ batchEnded: false });
    t.mailer.clear();
    const id = await batchOf(fitA, 77);
    expect((await waitDone(id)).state).toBe('done');
    for (let i = 0; i < 50 && t.mailer.messages().length < 2; i++) await sleep(20);
    const to = t.mailer.messages().filter((m) => m.subject.startsWith('Batch finished')).map((m) => m.to).sort();
    expect(to).toEqual([LEAD, REVIEWER].sort());
    await request(t.app).patch('/api/me/notifications').set(bearer(stats)).send({ batchEnded: true });
  });
});

describe('comparing two models', () => {
  it('puts estimates with SE and t = estimate/SE, p-values with their Monte Carlo error, and marks "better" only beyond that error', async () => {
    // Give fit A standard errors and a failed convergence check, as an estimated fit would have
    // (the fits of this file are entered by hand, which have neither).
    const stored = (await t.dataSource.query(`SELECT "results" FROM "fits" WHERE "id" = ?`, [fitA])) as { results: string }[];
    const results = JSON.parse(stored[0].results) as { parameters: { key: string; se: number | null; convergenceT: number | null }[]; maxAbsT: number | null; tauMax: number | null; converged: boolean };
    const ses: Record<string, number> = { density: 0.5, reciprocity: 0.61 };
    for (const p of results.parameters) {
      if (ses[p.key] !== undefined) {
        p.se = ses[p.key];
        p.convergenceT = 0.14;
      }
    }
    Object.assign(results, { maxAbsT: 0.14, tauMax: 0.3, converged: false });
    await t.dataSource.query(`UPDATE "fits" SET "results" = ? WHERE "id" = ?`, [JSON.stringify(results), fitA]);

    const res = await request(t.app).get(`/api/studies/${studyId}/compare?batches=${batchA},${batchB}`).set(bearer(reviewer));
    expect(res.status).toBe(200);
    const cmp = res.body as CompareResponse;
    expect(cmp.columns.map((c) => [c.batchId, c.fitId, c.modelName, c.converged])).toEqual([
      [batchA, fitA, 'Structure only', false],
      [batchB, fitB, 'Structure and watch', null],
    ]);
    const watch = cmp.estimates.find((e) => e.key === 'same_covariate:watch')!;
    expect(watch.cells).toEqual([null, { value: 0.9, se: null, convergenceT: null, t: null, significance: null }]);
    const density = cmp.estimates.find((e) => e.key === 'density')!;
    expect(density.cells.map((c) => c!.value)).toEqual([-1.9, -2.2]);
    expect('better' in density).toBe(false);
    // Normal quantiles from scipy: |t| = 3.8 is significant at 1%; 1.6 / 0.61 = 2.62 at 1% too; a t of 1.9/0.5 = 3.8.
    const z = JSON.parse(spawnSync('/usr/bin/python3', ['-c', 'import json; from scipy.stats import norm; print(json.dumps([norm.ppf(0.975), norm.ppf(0.995)]))'], { encoding: 'utf8' }).stdout) as [number, number];
    const word = (tv: number) => (Math.abs(tv) >= z[1] ? 'p1' : Math.abs(tv) >= z[0] ? 'p5' : 'none');
    expect(density.cells[0]).toMatchObject({ se: 0.5, t: -1.9 / 0.5, significance: word(-1.9 / 0.5) });
    expect(density.cells[1]).toMatchObject({ se: null, t: null, significance: null });
    for (const r of cmp.estimates.filter((e) => e.kind === 'rate')) for (const c of r.cells) expect(c?.t ?? null).toBeNull();

    expect(cmp.pValues).toHaveLength(10);
    const gofs: { p: number; n: number; d: number }[][] = [[], []];
    for (const row of cmp.pValues) {
      const both = await Promise.all(
        [batchA, batchB].map(async (id) => ((await request(t.app).get(`${B(id)}/gof?statistic=${row.statistic}&period=${row.period}`).set(bearer(reviewer))).body as GofResponse).test),
      );
      both.forEach((g, i) => gofs[i].push({ p: g.pValue, n: g.chains, d: g.distance }));
      expect(row.cells.map((c) => c!.pValue)).toEqual(both.map((g) => g.pValue));
    }
    // Monte Carlo SE of each p-value: the binomial standard deviation over N (scipy), p kept 1/(N + 1) from the edges.
    const flat = gofs.flat();
    const sd = JSON.parse(
      spawnSync('/usr/bin/python3', ['-c', 'import json,sys; from scipy.stats import binom; print(json.dumps([float(binom.std(n, p)) / n for p, n in json.loads(sys.argv[1])]))', JSON.stringify(flat.map((g) => [Math.min(g.n / (g.n + 1), Math.max(1 / (g.n + 1), g.p)), g.n]))], { encoding: 'utf8' }).stdout,
    ) as number[];
    let k = 0;
    for (let i = 0; i < 2; i++) {
      cmp.pValues.forEach((row, r) => {
        expect(row.cells[i]!.mcSe).toBeCloseTo(sd[i * cmp.pValues.length + r], 12);
        k++;
      });
    }
    expect(k).toBe(20);
    for (const row of cmp.pValues) {
      const [a, b] = row.cells.map((c) => c!);
      const margin = 2 * Math.sqrt(a.mcSe ** 2 + b.mcSe ** 2);
      const expected = a.pValue - b.pValue > margin ? 0 : b.pValue - a.pValue > margin ? 1 : null;
      expect(row.better).toBe(expected);
      expect(row.difference).toBe(expected === null ? 'within' : 'beyond');
    }
    expect(cmp.betterRule).toMatch(/2 combined Monte Carlo standard errors/);
    gofs.forEach((g, i) => {
      expect(cmp.overall[i]).toEqual({ failing: g.filter((x) => x.p < 0.05).length, tested: 10, distanceSum: expect.closeTo(g.reduce((s, x) => s + x.d, 0), 9) });
    });
    const board = (await request(t.app).get(`${B(batchB)}/board`).set(bearer(reviewer))).body as BoardResponse;
    expect(cmp.verdicts[1]).toEqual(board.counts);
    expect(cmp.verdicts[0]).toEqual({ pass: 0, fail: 0, unsure: 0, awaiting: 10, total: 10 });
  });

  it('refuses fewer than two or more than four items, and ids that are not numbers', async () => {
    expect((await request(t.app).get(`/api/studies/${studyId}/compare?batches=${batchA}`).set(bearer(reviewer))).status).toBe(400);
    expect((await request(t.app).get(`/api/studies/${studyId}/compare?batches=1,2,3,4,5`).set(bearer(reviewer))).status).toBe(400);
    const bad = await request(t.app).get(`/api/studies/${studyId}/compare?batches=${batchA},abc`).set(bearer(reviewer));
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/"abc" is not one/);
    expect((await request(t.app).get(`/api/studies/${studyId}/compare?batches=${batchA},9999`).set(bearer(reviewer))).status).toBe(404);
    expect((await request(t.app).get(`/api/studies/${studyId}/compare?batches=${batchA},${batchB}`).set(bearer(outsider))).status).toBe(404);
  });

  it('a site admin who is not a member passes the guards (shared/api.ts: admins pass every guard)', async () => {
    expect((await request(t.app).get(`${B(batchA)}/board`).set(bearer(admin))).status).toBe(200);
  });
});

describe('the consensus view', () => {
  it('gives fixed seeded positions, and its tie classes agree with the batch module\'s comparison and the wave data', async () => {
    const url = `${B(batchB)}/consensus/layout?period=1`;
    const [a, b] = await Promise.all([request(t.app).get(url).set(bearer(reviewer)), request(t.app).get(url).set(bearer(lead))]);
    expect(a.status).toBe(200);
    const layout = a.body as ConsensusLayoutDto;
    expect(b.body.positions).toEqual(layout.positions);
    expect(layout.positions).toHaveLength(24);
    for (const [x, y] of layout.positions) {
      expect(x).toBeGreaterThanOrEqual(0);
      expect(x).toBeLessThanOrEqual(1);
      expect(y).toBeGreaterThanOrEqual(0);
      expect(y).toBeLessThanOrEqual(1);
    }
    // The observed ties are those of wave 2 as the data module serves them (no missing ties in the demo).
    const wave = (await request(t.app).get(`/api/studies/${studyId}/data/waves/2`).set(bearer(reviewer))).body as WaveTiesResponse;
    const key = (p: number[]) => `${p[0]}>${p[1]}`;
    expect(layout.observedTies.map(key).sort()).toEqual(wave.ties.map(key).sort());
    const data = (await request(t.app).get(`/api/studies/${studyId}/data`).set(bearer(reviewer))).body as StudyDataResponse;
    expect(layout.covariates.map((c) => [c.name, c.kind]).sort()).toEqual(data.covariates.map((c) => [c.name, c.kind]).sort());
    for (const threshold of [0.3, 0.5, 0.8]) {
      const consensus = (await request(t.app).get(`${B(batchB)}/consensus?period=1&threshold=${threshold}`).set(bearer(reviewer))).body as ConsensusResponse;
      const counts = countKinds(classifyTies(consensus.ties, layout.observedTies));
      expect(counts).toEqual({ matched: consensus.comparison.matched, missed: consensus.comparison.missed, extra: consensus.comparison.extra });
    }
    expect((await request(t.app).get(`${B(batchB)}/consensus/layout?period=5`).set(bearer(reviewer))).status).toBe(404);
  });
});
