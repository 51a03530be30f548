/**
 * The fit screen says how many rounds an estimation took (automatic continuation from its own
 * estimates, up to the stated budget) and whether it met the common-practice convergence thresholds
 * (every |t| < 0.1, overall maximum convergence ratio < 0.25), on a phone and a wide screen.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FitDetail } from '../../shared/models';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { stopJobQueue } from '../../server/jobs';
import { openBrowser, screenshot, signIn, startServer, type ViewportName, type WavefitServer } from './harness';

let server: WavefitServer;
let studyId: number;
let token: string;
let modelId: number;
let fit: FitDetail;

async function call<T>(method: string, path: string, body?: unknown): Promise<{ status: number; body: T }> {
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
  token = ((await login.json()) as { token: string }).token;
  const model = await call<{ model: { id: number } }>('POST', `/studies/${studyId}/models`, {
    name: 'Rounds check',
    rates: [
      { period: 1, estimate: true },
      { period: 2, estimate: true },
    ],
    effects: [
      { id: 'density', estimate: true },
      { id: 'reciprocity', estimate: true },
    ],
  });
  modelId = model.body.model.id;
  const started = await call<{ fit: { id: number } }>('POST', `/studies/${studyId}/models/${modelId}/fits`, { seed: 11 });
  for (;;) {
    fit = (await call<{ fit: FitDetail }>('GET', `/studies/${studyId}/models/${modelId}/fits/${started.body.fit.id}`)).body.fit;
    if (fit.state !== 'queued' && fit.state !== 'running') break;
    await new Promise((ok) => setTimeout(ok, 500));
  }
}, 300_000);

afterAll(async () => {
  if (server) await stopJobQueue(server.dataSource);
  await server?.close();
});

describe.each<ViewportName>(['desktop', 'phone'])('rounds on the fit screen (%s)', (viewport) => {
  it('says how many rounds the fit took and whether it converged', async () => {
    expect(fit.state).toBe('done');
    const r = fit.results!;
    expect(r.roundBudget).toBe(3);
    const b = await openBrowser(viewport);
    try {
      const { page } = b;
      await page.goto(server.baseUrl + '/sign-in');
      await signIn(page, 'stats@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');
      await page.goto(`${server.baseUrl}/studies/${studyId}/models/${modelId}/fits/${fit.id}`);
      const rounds = page.getByTestId('fit-rounds');
      await rounds.waitFor();
      const text = await rounds.innerText();
      expect(text).toContain(r.rounds === 1 ? 'took 1 round of the 3 allowed' : `took ${r.rounds} rounds of the 3 allowed`);
      await page.getByTestId(r.converged ? 'fit-converged' : 'fit-not-converged').waitFor();
      await rounds.scrollIntoViewIfNeeded();
      await screenshot(page, 'fit-rounds', viewport);
    } finally {
      await b.close();
    }
  });
});
