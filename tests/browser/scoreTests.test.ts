/**
 * Score-type tests on the fit screen in Debian's chromium (demo study, a hand-entered fit of density
 * and reciprocity): the statistician asks for the tests, sees the left-out effects ranked as the API
 * ranks them (Schweinberger 2012, British Journal of Mathematical and Statistical Psychology
 * 65:263-281; the statistics are checked in tests/estimate/scoreTest.test.ts), and creates the extended
 * model with one press, at 1440 and at 390.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ScoreTestsResponse } from '../../shared/scoreTests';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { stopJobQueue } from '../../server/jobs';
import { openBrowser, screenshot, signIn, startServer, type ViewportName, type WavefitServer } from './harness';

let server: WavefitServer;
let studyId: number;
let token: string;

async function call<T>(method: string, path: string, body?: unknown): Promise<{ status: number; body: T }> {
  const res = await fetch(`${server.baseUrl}/api${path}`, {
    method,
    headers: { Authorization: `Bearer ${token}`, ...(body ? { 'Content-Type': 'application/json' } : {}) },
    body: body ? JSON.stringify(body) : undefined,
  });
  return { status: res.status, body: (await res.json()) as T };
}

async function fixedFit(name: string): Promise<{ modelId: number; fitId: number }> {
  const model = await call<{ model: { id: number } }>('POST', `/studies/${studyId}/models`, {
    name,
    rates: [
      { period: 1, estimate: false, value: 2.5 },
      { period: 2, estimate: false, value: 2.5 },
    ],
    effects: [
      { id: 'density', value: -1.9, estimate: false },
      { id: 'reciprocity', value: 1.4, estimate: false },
    ],
  });
  const fit = await call<{ fit: { id: number } }>('POST', `/studies/${studyId}/models/${model.body.model.id}/fits`, { mode: 'fixed' });
  return { modelId: model.body.model.id, fitId: fit.body.fit.id };
}

beforeAll(async () => {
  server = await startServer();
  studyId = server.seed.studyId;
  const login = await fetch(`${server.baseUrl}/api/auth/login`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email: 'stats@harbourside.example', password: DEMO_PASSWORD }),
  });
  token = ((await login.json()) as { token: string }).token;
});

afterAll(async () => {
  if (server) await stopJobQueue(server.dataSource);
  await server?.close();
});

describe.each<ViewportName>(['desktop', 'phone'])('score-type tests on the fit screen (%s)', (viewport) => {
  it('ranks the left-out effects as the API does and creates the extended model', async () => {
    const { modelId, fitId } = await fixedFit(`Structure only (${viewport})`);
    const b = await openBrowser(viewport);
    try {
      const { page } = b;
      await page.goto(server.baseUrl + '/sign-in');
      await signIn(page, 'stats@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');
      await page.goto(`${server.baseUrl}/studies/${studyId}/models/${modelId}/fits/${fitId}`);
      await page.getByRole('button', { name: 'Test the left-out effects' }).click();
      const list = page.getByRole('list', { name: 'Left-out effects, most promising first' });
      await list.waitFor({ timeout: 120_000 });
      const api = (await call<ScoreTestsResponse>('GET', `/studies/${studyId}/models/${modelId}/fits/${fitId}/score-tests`)).body;
      const items = await list.getByRole('listitem').all();
      expect(items.length).toBe(api.candidates.length);
      for (let k = 0; k < Math.min(3, items.length); k++) expect(await items[k].innerText()).toContain(api.candidates[k].sentence);
      const top = api.candidates[0];
      expect(top.pValue).toBeLessThan(0.1);
      await items[0].scrollIntoViewIfNeeded();
      await screenshot(page, 'score-tests', viewport);
      await page.getByRole('button', { name: `Create the model with ${top.label.toLowerCase()} added` }).click();
      await page.waitForURL((u) => /\/models\/\d+$/.test(u.pathname) && !u.pathname.endsWith(`/models/${modelId}`));
      const newId = Number(/\/models\/(\d+)$/.exec(new URL(page.url()).pathname)![1]);
      const created = await call<{ model: { name: string; effects: { id: string; estimate: boolean }[] } }>('GET', `/studies/${studyId}/models/${newId}`);
      expect(created.body.model.name).toBe(top.extendedModel.name);
      expect(created.body.model.effects.map((e) => e.id)).toEqual(['density', 'reciprocity', top.effectId]);
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});
