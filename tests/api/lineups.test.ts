/**
 * The lineup test through the API, on the demo study with one small finished batch:
 * - a lineup of m panels holds the observed vector once and m - 1 simulated vectors (Buja et al. 2009,
 *   Phil. Trans. R. Soc. A 367:4361-4383: the observed plot hidden among null plots drawn alike);
 * - before a person picks, nothing the API gives them names the observed panel (no answer, no plan, no
 *   chain numbers, no one else's picks); after the pick the answer is shown, and the found position
 *   agrees with the panel whose values equal the observed vector from the board's chart endpoint;
 * - one pick per person (the second is refused and nothing changes), bad picks store nothing;
 * - the result is P(Binomial(K, 1/m) >= x) (Majumder, Hofmann & Cook 2013, JASA 108:942-956), checked
 *   against the closed forms 1 - (1 - 1/m)^K for x = 1 and (1/m)^K for x = K (binomial theory);
 * - the same seed gives the same lineup; a lead invites members by e-mail (the outbox), a reviewer may not.
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BatchDetail } from '../../shared/batches';
import type { LineupDetail, LineupSummary } from '../../shared/lineups';
import type { EnvelopeChartDto } from '../../shared/review';
import { UserEntity } from '../../server/auth/entities';
import { stopJobQueue } from '../../server/jobs';
import { LEAD, REVIEWER, STATS, bearer, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let lead: string;
let stats: string;
let reviewer: string;
let studyId: number;
let batchId: number;
let ids: Record<'lead' | 'stats' | 'reviewer', number>;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const B = () => `/api/studies/${studyId}/batches/${batchId}`;
const L = (id: number) => `/api/studies/${studyId}/lineups/${id}`;

beforeAll(async () => {
  t = await makeTestApp();
  studyId = t.seed.studyId;
  [lead, stats, reviewer] = await Promise.all([t.tokenFor(LEAD), t.tokenFor(STATS), t.tokenFor(REVIEWER)]);
  const users = t.dataSource.getRepository(UserEntity);
  const byEmail = async (email: string) => (await users.findOneByOrFail({ email })).id;
  ids = { lead: await byEmail(LEAD), stats: await byEmail(STATS), reviewer: await byEmail(REVIEWER) };
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
  const fit = await request(t.app).post(`/api/studies/${studyId}/models/${model.body.model.id}/fits`).set(bearer(stats)).send({ mode: 'fixed' });
  expect(fit.status).toBe(201);
  const batch = await request(t.app).post(`/api/studies/${studyId}/batches`).set(bearer(stats)).send({ fitId: fit.body.fit.id, chains: 40, seed: 5 });
  expect(batch.status).toBe(201);
  batchId = batch.body.batch.id;
  for (let i = 0; i < 600; i++) {
    const res = await request(t.app).get(B()).set(bearer(stats));
    if (!['queued', 'running'].includes((res.body.batch as BatchDetail).state)) break;
    await sleep(100);
  }
});

afterAll(async () => {
  await stopJobQueue(t.dataSource);
  await t.close();
});

const create = (token: string, body: Record<string, unknown>) => request(t.app).post(`${B()}/lineups`).set(bearer(token)).send(body);
const detail = async (token: string, id: number) => (await request(t.app).get(L(id)).set(bearer(token))).body as LineupDetail;
const same = (a: number[], b: number[]) => a.length === b.length && a.every((x, k) => x === b[k]);

describe('a lineup before anyone picks', () => {
  let lineupId: number;
  it('has 20 panels by default: the observed vector once, among simulated ones, on shared axes', async () => {
    const res = await create(reviewer, { statistic: 'outdegree_distribution', period: 1 });
    expect(res.status).toBe(201);
    const summary = res.body.lineup as LineupSummary;
    expect(summary.panels).toBe(20);
    expect(summary.result.reviewers).toBe(0);
    expect(summary.result.pValue).toBeNull();
    lineupId = summary.id;
    const d = await detail(reviewer, lineupId);
    expect(d.panelValues).toHaveLength(20);
    const chart = (await request(t.app).get(`${B()}/board/chart?statistic=outdegree_distribution&period=1`).set(bearer(reviewer))).body as EnvelopeChartDto;
    const matches = d.panelValues.filter((v) => same(v, chart.observed));
    expect(matches.length).toBeGreaterThanOrEqual(1);
    for (const v of d.panelValues) for (const x of v) {
      expect(x).toBeGreaterThanOrEqual(d.yMin);
      expect(x).toBeLessThanOrEqual(d.yMax);
    }
  });

  it('does not tell anyone who has not picked which panel is observed', async () => {
    for (const token of [reviewer, lead, stats]) {
      const res = await request(t.app).get(L(lineupId)).set(bearer(token));
      expect(res.status).toBe(200);
      expect(res.body.answer).toBeNull();
      const text = JSON.stringify(res.body);
      expect(text).not.toMatch(/observedPanel|chainOfPanel|"plan"|"chain"|correct"?\s*:\s*true/);
      expect(Object.keys(res.body).sort()).toEqual(
        ['answer', 'batchId', 'batchLabel', 'components', 'createdAt', 'createdBy', 'id', 'label', 'panelValues', 'panels', 'period', 'picked', 'result', 'scale', 'seed', 'statistic', 'studyId', 'yMax', 'yMin'].sort(),
      );
      const list = await request(t.app).get(`${B()}/lineups`).set(bearer(token));
      expect(JSON.stringify(list.body)).not.toMatch(/observedPanel|chainOfPanel|"plan"/);
    }
  });

  it('refuses bad picks with a clear 400 and stores nothing', async () => {
    const before = await t.counts('lineup_picks');
    const cases: [Record<string, unknown>, RegExp][] = [
      [{ panel: 21, reason: 'looks odd' }, /panels 1 to 20/],
      [{ panel: 0, reason: 'looks odd' }, /numbered from 1/],
      [{ panel: 3, reason: '' }, /few words/],
      [{ panel: 'three', reason: 'looks odd' }, /panel/],
    ];
    for (const [body, message] of cases) {
      const res = await request(t.app).post(`${L(lineupId)}/picks`).set(bearer(reviewer)).send(body);
      expect(res.status).toBe(400);
      expect(JSON.stringify(res.body.error)).toMatch(message);
    }
    expect(await t.counts('lineup_picks')).toEqual(before);
    expect(await t.counts('lineup_picks')).toEqual({ lineup_picks: 0 });
  });
});

describe('picking', () => {
  it('shows the answer after the pick, one pick per person, and the binomial result', async () => {
    const created = (await create(lead, { statistic: 'outdegree_distribution', period: 1, seed: 99 })).body.lineup as LineupSummary;
    const before = await detail(reviewer, created.id);
    const chart = (await request(t.app).get(`${B()}/board/chart?statistic=outdegree_distribution&period=1`).set(bearer(reviewer))).body as EnvelopeChartDto;
    const candidates = before.panelValues.map((v, k) => (same(v, chart.observed) ? k + 1 : 0)).filter((k) => k > 0);

    // The reviewer picks a panel that is not the observed vector: wrong.
    const wrongPanel = [1, 2, 3, 4].find((k) => !candidates.includes(k))!;
    const r1 = await request(t.app).post(`${L(created.id)}/picks`).set(bearer(reviewer)).send({ panel: wrongPanel, reason: 'Its tail is longer' });
    expect(r1.status).toBe(201);
    const a1 = r1.body as LineupDetail;
    expect(a1.answer).not.toBeNull();
    expect(candidates).toContain(a1.answer!.observedPanel);
    expect(a1.answer!.mine).toMatchObject({ panel: wrongPanel, correct: false, reason: 'Its tail is longer', reviewer: { id: ids.reviewer } });
    expect(a1.result).toMatchObject({ reviewers: 1, correct: 0, pValue: 1 });
    expect(a1.result.caution).toMatch(/Only 1 reviewer/);

    // A second pick is refused and nothing changes.
    const again = await request(t.app).post(`${L(created.id)}/picks`).set(bearer(reviewer)).send({ panel: a1.answer!.observedPanel, reason: 'now I know' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('already_picked');
    expect((await detail(reviewer, created.id)).result.reviewers).toBe(1);

    // The statistician has not picked: no answer and no one else's pick.
    const s = await detail(stats, created.id);
    expect(s.answer).toBeNull();
    expect(s.result.reviewers).toBe(1);
    // The lead and the statistician find it: K = 3, x = 2.
    const observed = a1.answer!.observedPanel;
    const r2 = (await request(t.app).post(`${L(created.id)}/picks`).set(bearer(lead)).send({ panel: observed, reason: 'Fewer people with no ties' })).body as LineupDetail;
    expect(r2.result).toMatchObject({ reviewers: 2, correct: 1 });
    expect(r2.result.pValue!).toBeCloseTo(1 - (19 / 20) ** 2, 12); // x = 1: 1 - (1 - 1/m)^K
    const r3 = (await request(t.app).post(`${L(created.id)}/picks`).set(bearer(stats)).send({ panel: observed, reason: 'Peak sits at two' })).body as LineupDetail;
    expect(r3.result).toMatchObject({ reviewers: 3, correct: 2 });
    // P(X >= 2), X ~ Bin(3, 1/20): 3 p^2 (1 - p) + p^3.
    expect(r3.result.pValue!).toBeCloseTo(3 * (1 / 20) ** 2 * (19 / 20) + (1 / 20) ** 3, 12);
    expect(r3.answer!.picks.map((p) => p.reviewer.id)).toEqual([ids.reviewer, ids.lead, ids.stats]);

    // The fit report carries the result on the card, without the answer.
    const report = await request(t.app).get(`${B()}/report.json`).set(bearer(reviewer));
    expect(report.status).toBe(200);
    const card = (report.body.statistics as { statistic: string; period: number; lineups: { id: number; result: { reviewers: number; correct: number } }[] }[]).find(
      (c) => c.statistic === 'outdegree_distribution' && c.period === 1,
    )!;
    expect(card.lineups.find((l) => l.id === created.id)!.result).toMatchObject({ reviewers: 3, correct: 2 });
    expect(JSON.stringify(report.body)).not.toMatch(/observedPanel|chainOfPanel/);
    const pdf = await request(t.app).get(`${B()}/report.pdf`).set(bearer(reviewer));
    expect(pdf.status).toBe(200);
  });

  it('the same seed gives the same lineup; another seed another', async () => {
    const a = (await create(stats, { statistic: 'triad_census', period: 1, panels: 8, seed: 1234 })).body.lineup as LineupSummary;
    const b = (await create(stats, { statistic: 'triad_census', period: 1, panels: 8, seed: 1234 })).body.lineup as LineupSummary;
    const c = (await create(stats, { statistic: 'triad_census', period: 1, panels: 8, seed: 1235 })).body.lineup as LineupSummary;
    const [da, db, dc] = [await detail(stats, a.id), await detail(stats, b.id), await detail(stats, c.id)];
    expect(da.scale).toBe('standardised');
    expect(da.panelValues).toEqual(db.panelValues);
    expect(dc.panelValues).not.toEqual(da.panelValues);
    // Without a seed, two lineups of the same card differ (the seed counts the card's lineups).
    const d1 = (await create(stats, { statistic: 'triad_census', period: 2, panels: 8 })).body.lineup as LineupSummary;
    const d2 = (await create(stats, { statistic: 'triad_census', period: 2, panels: 8 })).body.lineup as LineupSummary;
    expect(d1.seed).not.toBe(d2.seed);
  });

  it('refuses lineups of unknown cards or with more panels than simulations allow, storing nothing', async () => {
    const before = await t.counts('lineups');
    expect((await create(stats, { statistic: 'outdegree_distribution', period: 9 })).status).toBe(404);
    expect((await create(stats, { statistic: 'no_such', period: 1 })).status).toBe(400);
    expect((await create(stats, { statistic: 'outdegree_distribution', period: 1, panels: 3 })).status).toBe(400);
    const big = await create(stats, { statistic: 'outdegree_distribution', period: 1, panels: 40 }); // needs 39 of 40 chains: allowed
    expect(big.status).toBe(201);
    expect((await t.counts('lineups')).lineups).toBe(before.lineups + 1);
  });
});

describe('inviting', () => {
  it('a lead invites members by e-mail with a link to the lineup; a reviewer may not; those who picked are not invited again', async () => {
    const lineup = (await create(lead, { statistic: 'outdegree_distribution', period: 2 })).body.lineup as LineupSummary;
    const forbidden = await request(t.app).post(`${L(lineup.id)}/invitations`).set(bearer(reviewer)).send({ userIds: [ids.stats] });
    expect(forbidden.status).toBe(403);
    const stranger = await request(t.app).post(`${L(lineup.id)}/invitations`).set(bearer(lead)).send({ userIds: [987654] });
    expect(stranger.status).toBe(400);
    expect(stranger.body.error.message).toMatch(/Only members/);

    await request(t.app).post(`${L(lineup.id)}/picks`).set(bearer(stats)).send({ panel: 1, reason: 'first one' });
    t.mailer.clear();
    const res = await request(t.app).post(`${L(lineup.id)}/invitations`).set(bearer(lead)).send({ userIds: [ids.reviewer, ids.stats], message: 'Before Friday please' });
    expect(res.status).toBe(201);
    expect(res.body).toEqual({ invited: [ids.reviewer], alreadyPicked: [ids.stats] });
    for (let i = 0; i < 50 && t.mailer.messages().length < 1; i++) await sleep(20);
    const mails = t.mailer.messages();
    expect(mails).toHaveLength(1);
    expect(mails[0].to).toBe(REVIEWER);
    expect(mails[0].subject).toMatch(/^Lineup test: /);
    expect(mails[0].text).toContain(`/studies/${studyId}/board/${batchId}/lineups/${lineup.id}`);
    expect(mails[0].text).toContain('Before Friday please');
  });

  it('without signing in the list is refused (401)', async () => {
    const list = await request(t.app).get(`${B()}/lineups`);
    expect(list.status).toBe(401);
  });
});
