/**
 * The lineup test in Debian's chromium against the real server (demo study, one small batch made
 * through the API):
 * - on a desktop (1440) the lead starts a lineup from a board card and invites the team by e-mail;
 * - on a phone (390) the reviewer follows the e-mailed link, picks a panel with a reason, and only then
 *   sees the answer;
 * - back on the desktop the lead sees the result on the board card.
 * Expected values come from the API (read over HTTP), never from screenshots. The p-value wording is
 * P(Binomial(K, 1/m) >= x) (Majumder, Hofmann & Cook 2013, JASA 108:942-956), checked in tests/gof/lineup.test.ts.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { LineupDetail, LineupSummary } from '../../shared/lineups';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { stopJobQueue } from '../../server/jobs';
import { openBrowser, screenshot, signIn, startServer, type WavefitServer } from './harness';

let server: WavefitServer;
let studyId: number;
let batchId: number;

async function call<T>(method: string, path: string, token: string, body?: unknown): Promise<{ status: number; body: T }> {
  const res = await fetch(`${server.baseUrl}/api${path}`, {
    method,
    headers: { Authorization: `Bearer ${token}`, ...(body ? { 'Content-Type': 'application/json' } : {}) },
    body: body ? JSON.stringify(body) : undefined,
  });
  return { status: res.status, body: (await res.json()) as T };
}

beforeAll(async () => {
  server = await startServer();
  studyId = server.seed.studyId;
  const login = await fetch(`${server.baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email: 'stats@harbourside.example', password: DEMO_PASSWORD }),
  });
  const { token } = (await login.json()) as { token: string };
  const model = await call<{ model: { id: number } }>('POST', `/studies/${studyId}/models`, token, {
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
  const fit = await call<{ fit: { id: number } }>('POST', `/studies/${studyId}/models/${model.body.model.id}/fits`, token, { mode: 'fixed' });
  const batch = await call<{ batch: { id: number } }>('POST', `/studies/${studyId}/batches`, token, { fitId: fit.body.fit.id, chains: 60, seed: 21, label: 'Lineup check' });
  batchId = batch.body.batch.id;
  for (let i = 0; i < 600; i++) {
    const b = await call<{ batch: { state: string } }>('GET', `/studies/${studyId}/batches/${batchId}`, token);
    if (!['queued', 'running'].includes(b.body.batch.state)) break;
    await new Promise((r) => setTimeout(r, 100));
  }
});

afterAll(async () => {
  if (server) await stopJobQueue(server.dataSource);
  await server?.close();
});

async function apiGet<T>(page: Page, path: string): Promise<T> {
  return page.evaluate(async (p) => (await (await fetch(`/api${p}`, { credentials: 'include' })).json()) as T, path) as Promise<T>;
}

describe('a lineup from the board to a phone and back', () => {
  it('the lead starts and invites, the reviewer takes it on a phone, the lead sees the result', async () => {
    const lead = await openBrowser('desktop');
    const phone = await openBrowser('phone');
    try {
      // The lead starts a lineup from the outdegree card.
      const p = lead.page;
      await p.goto(server.baseUrl + '/sign-in');
      await signIn(p, 'lead@harbourside.example', DEMO_PASSWORD);
      await p.waitForURL((u) => u.pathname === '/');
      await p.goto(`${server.baseUrl}/studies/${studyId}/board/${batchId}`);
      const card = p.getByTestId('card-outdegree_distribution-1');
      await card.getByRole('button', { name: 'Start a lineup of Outdegree distribution, period 1' }).click();
      await p.waitForURL(/\/lineups\/\d+$/);
      const lineupId = Number(/\/lineups\/(\d+)$/.exec(p.url())![1]);
      await p.getByTestId('lineup-panel-20').waitFor();
      await screenshot(p, 'lineup', 'desktop');
      // The lead has not picked: the screen offers the pick and shows no answer.
      expect(await p.getByTestId('lineup-answer').count()).toBe(0);

      await p.getByRole('link', { name: '← Review board' }).click();
      await card.getByRole('button', { name: 'Invite the team to lineup 1 of Outdegree distribution, period 1' }).click();
      await card.getByText(/Invited \d+ members? by e-mail/).waitFor();
      const mail = server.mailer.messages().find((m) => m.to === 'reviewer@harbourside.example' && m.subject.startsWith('Lineup test'));
      expect(mail).toBeDefined();
      const link = /(http\S+\/lineups\/\d+)/.exec(mail!.text)![1];
      expect(link).toContain(`/studies/${studyId}/board/${batchId}/lineups/${lineupId}`);

      // The reviewer takes it on a phone.
      const q = phone.page;
      await q.goto(server.baseUrl + '/sign-in');
      await signIn(q, 'reviewer@harbourside.example', DEMO_PASSWORD);
      await q.waitForURL((u) => u.pathname === '/');
      await q.goto(link);
      await q.getByTestId('lineup-panel-20').waitFor();
      const before = await apiGet<LineupDetail>(q, `/studies/${studyId}/lineups/${lineupId}`);
      expect(before.answer).toBeNull();
      await screenshot(q, 'lineup-pick', 'phone');
      await q.getByTestId('lineup-panel-7').click();
      await q.getByText('You picked panel 7.').waitFor();
      // Submitting without a reason is refused on the screen; nothing is stored.
      await q.getByRole('button', { name: 'Submit my pick' }).click();
      await q.getByText('Say in a few words why that panel looks different.').last().waitFor();
      expect((await apiGet<LineupDetail>(q, `/studies/${studyId}/lineups/${lineupId}`)).result.reviewers).toBe(0);
      await q.getByLabel('Why does it look different?').fill('More people with no outgoing ties');
      await q.getByRole('button', { name: 'Submit my pick' }).click();
      const answerCard = q.getByTestId('lineup-answer');
      await answerCard.waitFor();
      const after = await apiGet<LineupDetail>(q, `/studies/${studyId}/lineups/${lineupId}`);
      expect(after.answer!.mine.panel).toBe(7);
      const expected = after.answer!.observedPanel === 7 ? 'You found it: panel 7 is the observed wave.' : `Panel ${after.answer!.observedPanel} is the observed wave; you picked panel 7.`;
      await answerCard.getByText(expected).waitFor();
      await answerCard.scrollIntoViewIfNeeded();
      await screenshot(q, 'lineup-answer', 'phone');
      expect(phone.pageErrors).toEqual([]);

      // The lead sees the result on the board card.
      await p.reload();
      const summary = p.getByTestId(`lineup-summary-${lineupId}`);
      const list = await apiGet<{ lineups: LineupSummary[] }>(p, `/studies/${studyId}/batches/${batchId}/lineups`);
      const result = list.lineups.find((l) => l.id === lineupId)!.result;
      expect(result.reviewers).toBe(1);
      await summary.getByText(result.reading).waitFor();
      await summary.getByText(/Only 1 reviewer so far/).waitFor();
      await summary.scrollIntoViewIfNeeded();
      await screenshot(p, 'lineup-board', 'desktop');
      expect(lead.pageErrors).toEqual([]);
    } finally {
      await lead.close();
      await phone.close();
    }
  });
});
