/**
 * Explore the process in Debian's chromium against the real server with the demo results
 * (server/review/demo.ts: two estimated models, a 100-chain batch each):
 * - on a phone (390 x 844) a reviewer opens a batch, follows "Watch chains", steps a chain forward and
 *   back and sees the counts and the distance follow; then opens a fit's "Why actors choose", picks an
 *   actor in the grid (scrolled sideways) and reads the explanation;
 * - on a desktop (1440 x 900) the lead puts a second chain beside the first, scrubs the time axis,
 *   follows the link to the acting actor's explanation and sees the whole grid at once.
 * Expected values are recomputed here from the replay's own steps (read over HTTP), never from screenshots.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ChoiceResponse, ReplayResponse } from '../../shared/explore';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { stopJobQueue } from '../../server/jobs';
import { seedDemoResults, type DemoResults } from '../../server/demo/results';
import { openBrowser, screenshot, signIn, startServer, type WavefitServer } from './harness';

let server: WavefitServer;
let demo: DemoResults;
let studyId: number;

beforeAll(async () => {
  server = await startServer();
  studyId = server.seed.studyId;
  demo = await seedDemoResults(server.dataSource, studyId);
});
afterAll(async () => {
  if (server) await stopJobQueue(server.dataSource);
  await server?.close();
});

async function apiGet<T>(page: Page, path: string): Promise<T> {
  return page.evaluate(async (p) => {
    const res = await fetch(`/api${p}`, { credentials: 'include' });
    return (await res.json()) as T;
  }, path) as Promise<T>;
}

/** Counts after k ministeps, from the replay's steps (brute force). */
function countsAfter(r: ReplayResponse, k: number): { changes: number; noChange: number; distance: number } {
  const n = r.actors.length;
  const x = new Set(r.startTies.map(([i, j]) => i * n + j));
  const end = new Set(r.observedEndTies.map(([i, j]) => i * n + j));
  let changes = 0;
  let noChange = 0;
  for (let s = 0; s < k; s++) {
    const j = r.steps.alter[s];
    if (j < 0) noChange++;
    else {
      changes++;
      const key = r.steps.actor[s] * n + j;
      if (x.has(key)) x.delete(key);
      else x.add(key);
    }
  }
  let distance = 0;
  for (let key = 0; key < n * n; key++) if (key % (n + 1) !== 0 && x.has(key) !== end.has(key)) distance++;
  return { changes, noChange, distance };
}

const figure = async (page: Page, id: string) => Number(/\d+/.exec(await page.getByTestId(id).innerText())![0]);

describe('on a phone', () => {
  it('steps a chain forward and back, then opens an actor\'s explanation', async () => {
    const b = await openBrowser('phone');
    try {
      const { page } = b;
      await page.goto(server.baseUrl + '/sign-in');
      await signIn(page, 'reviewer@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');
      const batchId = demo.batchIds[0];
      await page.goto(`${server.baseUrl}/studies/${studyId}/batches/${batchId}`);
      await page.getByTestId('batch-explore').click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/explore/batches/${batchId}$`));
      await page.getByTestId('chain-panel-0').waitFor();
      const replay = await apiGet<ReplayResponse>(page, `/studies/${studyId}/explore/batches/${batchId}/replay?period=1&chain=1`);
      expect(replay.matchesStored).toBe(true);
      expect(await figure(page, 'count-ministeps-0')).toBe(0);
      expect(await figure(page, 'count-distance-0')).toBe(replay.distanceStart);

      for (let k = 0; k < 5; k++) await page.getByTestId('step-forward').click();
      expect(await figure(page, 'count-ministeps-0')).toBe(5);
      const after5 = countsAfter(replay, 5);
      expect(await figure(page, 'count-distance-0')).toBe(after5.distance);
      const counts = await page.getByTestId('chain-counts-0').innerText();
      expect(counts).toContain(String(after5.changes));
      await page.getByTestId('chain-panel-0').scrollIntoViewIfNeeded();
      await page.evaluate(() => window.scrollBy(0, 0));
      await screenshot(page, 'explore-playback-step5', 'phone');

      await page.getByTestId('step-back').click();
      await page.getByTestId('step-back').click();
      expect(await figure(page, 'count-ministeps-0')).toBe(3);
      expect(await figure(page, 'count-distance-0')).toBe(countsAfter(replay, 3).distance);
      const latest = await page.getByTestId('chain-latest-0').innerText();
      const a = replay.actors[replay.steps.actor[2]];
      expect(latest).toContain(a);

      // Tie timelines for the pairs this chain changed.
      await page.getByTestId('timeline-chart').waitFor();
      await page.getByTestId('timelines').scrollIntoViewIfNeeded();
      await screenshot(page, 'explore-timelines', 'phone');

      // The fit's explanation, from the fit screen.
      const fitId = demo.fitIds[0];
      const modelId = demo.modelIds[0];
      await page.goto(`${server.baseUrl}/studies/${studyId}/models/${modelId}/fits/${fitId}`);
      await page.getByTestId('fit-explore').click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/explore/fits/${fitId}`));
      await page.getByTestId('overview').waitFor();
      expect(await page.getByTestId('overview-scroll').count()).toBe(1); // the grid scrolls sideways on a phone
      await page.getByTestId('overview').scrollIntoViewIfNeeded();
      await screenshot(page, 'explore-overview', 'phone');
      await page.getByTestId('overview-row-5').click();
      const choice = await apiGet<ChoiceResponse>(page, `/studies/${studyId}/explore/fits/${fitId}/choices?period=1&actor=5`);
      const card = page.getByTestId('choice-explanation');
      await card.getByText(`${choice.actors[5]}: every option of one ministep`).waitFor();
      const top = choice.options[0];
      const topName = top.alter === null ? 'No change' : choice.actors[top.alter];
      await expect(card.getByTestId(`option-${top.alter ?? 'none'}`).innerText()).resolves.toContain(topName);
      await expect(card.innerText()).resolves.toMatch(/times (more|less) likely/);
      await card.scrollIntoViewIfNeeded();
      await screenshot(page, 'explore-choice', 'phone');
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});

describe('on a desktop', () => {
  it('shows two chains side by side on one clock, scrubs the time axis, and the whole grid', async () => {
    const b = await openBrowser('desktop');
    try {
      const { page } = b;
      await page.goto(server.baseUrl + '/sign-in');
      await signIn(page, 'lead@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');
      const batchId = demo.batchIds[1];
      await page.goto(`${server.baseUrl}/studies/${studyId}/explore/batches/${batchId}?chain=7`);
      await page.getByTestId('chain-panel-0').waitFor();
      await page.getByTestId('chain-add').click();
      await page.getByTestId('chain-panel-1').waitFor();
      const box = (await page.getByTestId('time-axis').boundingBox())!;
      await page.mouse.click(box.x + box.width / 2, box.y + 20);
      const clock = await page.getByTestId('clock').innerText();
      const t = Number(/Time ([0-9.]+)/.exec(clock)![1]);
      expect(Math.abs(t - 0.5)).toBeLessThan(0.03);
      const replay = await apiGet<ReplayResponse>(page, `/studies/${studyId}/explore/batches/${batchId}/replay?period=1&chain=7`);
      const done = replay.steps.t.filter((s) => s <= t).length;
      expect(await figure(page, 'count-ministeps-0')).toBe(done);
      expect(await figure(page, 'count-distance-0')).toBe(countsAfter(replay, done).distance);
      await page.getByTestId('step-forward').click();
      expect(await figure(page, 'count-ministeps-0')).toBeGreaterThanOrEqual(done);
      await screenshot(page, 'explore-playback-two', 'desktop');
      await page.getByTestId('timeline-chart').scrollIntoViewIfNeeded();
      await screenshot(page, 'explore-timelines', 'desktop');

      // From the playback to the acting actor's explanation (the batch simulates a stored fit).
      const shownSteps = await figure(page, 'count-ministeps-0');
      const actor = replay.actors[replay.steps.actor[shownSteps - 1]];
      await page.getByTestId('chain-panel-0').getByText(`How ${actor} weighs the options at the start of the period →`).click();
      await page.waitForURL(/\/explore\/fits\/[0-9]+/);
      await page.getByTestId('overview').waitFor();
      await page.getByTestId('choice-explanation').getByText(`${actor}: every option of one ministep`).waitFor();
      expect(await page.getByTestId('overview-scroll').count()).toBe(0); // whole at once
      await screenshot(page, 'explore-choice', 'desktop');
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});
