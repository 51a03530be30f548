/**
 * The journeys of issue 19 in Debian's chromium against the real server with the demo results
 * (server/demo/results.ts: two estimated models, a 100-chain batch each):
 * - the compare screen's marks and captions, read from the screen and checked against the batches
 *   module's own /gof endpoint: p = value ± its Monte Carlo standard error sqrt(p(1 - p) / N)
 *   (Davison & Hinkley 1997, Bootstrap Methods and their Application, section 4.2.5; p kept 1/(N + 1)
 *   from 0 and 1), "better" only
 *   where the difference exceeds 2 combined Monte Carlo SEs (our stated rule), t = estimate / SE
 *   against the normal quantiles 1.96 / 2.576 (common practice), a convergence line and an overall
 *   line per model, and the caution that p-values of different statistics are not independent;
 * - the consensus threshold set by a click on its track, a drag along it and the keyboard, never NaN;
 * - the Outbox entry only for a site admin, and only when /api/health says devOutbox: true;
 * - the web app's files: compressed, hashed files immutable for a year, index.html revalidated, and
 *   the sign-in page loading only some of the route chunks (sizes are measured in `npm run bench`).
 * The sign-off guard on screen is in board.test.ts (the lead's journey) and through the API in
 * tests/api/report.test.ts.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { GofResponse } from '../../shared/batches';
import type { CompareResponse } from '../../shared/review';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { stopJobQueue } from '../../server/jobs';
import { seedDemoResults, type DemoResults } from '../../server/demo/results';
import { openBrowser, screenshot, signIn, startServer, type ViewportName, type WavefitServer } from './harness';

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

const formatP = (p: number) => (p < 0.001 ? p.toExponential(1) : p.toFixed(3));

async function signedIn(viewport: ViewportName, email: string) {
  const b = await openBrowser(viewport);
  await b.page.goto(server.baseUrl + '/sign-in');
  await signIn(b.page, email, DEMO_PASSWORD);
  await b.page.waitForURL((u) => u.pathname === '/');
  return b;
}

describe('the compare screen', () => {
  for (const viewport of ['desktop', 'phone'] as const) {
    it(`shows estimates with SE and t, p-values with their Monte Carlo error, and marks only beyond it (${viewport})`, async () => {
      const b = await signedIn(viewport, 'stats@harbourside.example');
      try {
        const { page } = b;
        const [first, second] = demo.batchIds;
        await page.goto(`${server.baseUrl}/studies/${studyId}/compare?batches=${first},${second}`);
        await page.getByTestId('compare-independence').waitFor();
        const cmp = await apiGet<CompareResponse>(page, `/studies/${studyId}/compare?batches=${first},${second}`);

        // The caution about dependent p-values and the rule for "better", in words on the screen.
        expect(await page.getByTestId('compare-independence').innerText()).toMatch(/not independent/);
        await page.getByText(/marked better only when it exceeds each other model's by more than 2 combined Monte Carlo standard errors/).first().waitFor();

        // Per statistic: p ± MC SE from the /gof endpoint's p-value and chain count.
        let better = 0;
        for (const row of cmp.pValues) {
          const gofs = await Promise.all(
            [first, second].map((id) => apiGet<GofResponse>(page, `/studies/${studyId}/batches/${id}/gof?statistic=${row.statistic}&period=${row.period}`)),
          );
          const ses = gofs.map((g) => {
            const n = g.test.chains;
            const q = Math.min(n / (n + 1), Math.max(1 / (n + 1), g.test.pValue));
            return Math.sqrt((q * (1 - q)) / n);
          });
          for (let i = 0; i < 2; i++) {
            const text = await page.getByTestId(`p-${row.statistic}-${row.period}-${i}`).innerText();
            expect(text).toContain(`p = ${formatP(gofs[i].test.pValue)} ± ${ses[i].toFixed(3)}`);
          }
          const diff = gofs[0].test.pValue - gofs[1].test.pValue;
          const margin = 2 * Math.sqrt(ses[0] ** 2 + ses[1] ** 2);
          const expected = diff > margin ? 0 : -diff > margin ? 1 : null;
          for (let i = 0; i < 2; i++) {
            expect(await page.getByTestId(`p-${row.statistic}-${row.period}-${i}`).getByText('better', { exact: true }).count()).toBe(expected === i ? 1 : 0);
          }
          if (expected !== null) better++;
        }
        // No "better" anywhere else (estimates carry none).
        expect(await page.getByText('better', { exact: true }).count()).toBe(better);
        const within = cmp.pValues.length - better;
        expect(await page.getByText('Differences within Monte Carlo error: no model marked').count()).toBe(within);

        // Per parameter: t = estimate / SE and its significance word at the normal quantiles.
        for (const row of cmp.estimates) {
          for (let i = 0; i < 2; i++) {
            const cell = row.cells[i];
            if (!cell) continue;
            const text = await page.getByTestId(`estimate-${row.key}-${i}`).innerText();
            if (row.kind === 'rate') {
              expect(text).toContain('rate: not tested');
            } else if (cell.se !== null && cell.se > 0) {
              const tv = cell.value / cell.se;
              const word = Math.abs(tv) >= 2.575829 ? 'significant at 1%' : Math.abs(tv) >= 1.959964 ? 'significant at 5%' : 'not significant at 5%';
              expect(text).toContain(`t = ${tv.toFixed(2)} · ${word}`);
            }
          }
        }

        // Per model: a convergence line and the overall line (failures at 0.05, summed distance).
        for (let i = 0; i < 2; i++) {
          const c = cmp.columns[i];
          const conv = await page.getByTestId(`convergence-${i}`).innerText();
          expect(conv).toMatch(c.converged === null ? /Convergence: no check/ : c.converged ? /Convergence: pass/ : /Convergence: fail/);
          const gofs = await Promise.all(cmp.pValues.map((r) => apiGet<GofResponse>(page, `/studies/${studyId}/batches/${c.batchId}/gof?statistic=${r.statistic}&period=${r.period}`)));
          const failing = gofs.filter((g) => g.test.pValue < 0.05).length;
          const sum = gofs.reduce((s, g) => s + g.test.distance, 0);
          expect(await page.getByTestId(`overall-${i}`).innerText()).toBe(`Fails at 0.05: ${failing} of ${gofs.length} statistics · summed distance ${sum.toFixed(1)}`);
        }
        await screenshot(page, 'compare-marks', viewport);
        await page.getByTestId(`p-${cmp.pValues[0].statistic}-${cmp.pValues[0].period}-0`).scrollIntoViewIfNeeded();
        await screenshot(page, 'compare-pvalues', viewport);
        expect(b.pageErrors).toEqual([]);
      } finally {
        await b.close();
      }
    });
  }
});

describe('the consensus threshold', () => {
  it('is set by a click on its track, a drag along it and the keyboard, and never asks for NaN', async () => {
    const b = await signedIn('desktop', 'lead@harbourside.example');
    try {
      const { page } = b;
      const batch = demo.batchIds[1];
      await page.goto(`${server.baseUrl}/studies/${studyId}/board/${batch}/consensus`);
      await page.getByTestId('consensus-drawing').waitFor();
      const value = page.getByTestId('threshold-value');
      await value.getByText('Threshold 50% of chains').waitFor();
      const track = page.getByRole('slider', { name: 'Threshold' });
      const box = (await track.boundingBox())!;
      expect(box.width).toBeGreaterThan(50);

      // A click at 80% of the track: 0.05 + 0.8 x 0.95 = 0.81, snapped to 0.80.
      await track.click({ position: { x: box.width * 0.8, y: box.height / 2 } });
      await value.getByText('Threshold 80% of chains').waitFor();
      expect(await track.getAttribute('aria-valuenow')).toBe('80');
      await screenshot(page, 'consensus-track-click', 'desktop');

      // A drag from 20% to 60% of the track ends at 0.05 + 0.6 x 0.95 = 0.62, snapped to 0.60.
      await page.mouse.move(box.x + box.width * 0.2, box.y + box.height / 2);
      await page.mouse.down();
      await page.mouse.move(box.x + box.width * 0.4, box.y + box.height / 2, { steps: 4 });
      await page.mouse.move(box.x + box.width * 0.6, box.y + box.height / 2, { steps: 4 });
      await page.mouse.up();
      await value.getByText('Threshold 60% of chains').waitFor();

      // The keyboard on the focused track.
      await track.focus();
      await page.keyboard.press('ArrowLeft');
      await value.getByText('Threshold 55% of chains').waitFor();
      await page.keyboard.press('End');
      await value.getByText('Threshold 100% of chains').waitFor();
      await page.keyboard.press('Home');
      await value.getByText('Threshold 5% of chains').waitFor();
      await page.keyboard.press('PageUp');
      await value.getByText('Threshold 15% of chains').waitFor();

      // Every consensus request carried a finite threshold in (0, 1].
      const thresholds = b.requests
        .filter((u) => u.includes('/consensus?'))
        .map((u) => new URL(u).searchParams.get('threshold'))
        .filter((t): t is string => t !== null);
      expect(thresholds.length).toBeGreaterThan(3);
      for (const t of thresholds) {
        expect(Number.isFinite(Number(t)), t).toBe(true);
        expect(Number(t)).toBeGreaterThan(0);
        expect(Number(t)).toBeLessThanOrEqual(1);
      }
      expect(thresholds).toContain('0.8');
      expect(thresholds).toContain('0.6');
      expect(await page.getByText(/NaN/).count()).toBe(0);

      // The counts on screen are the server's for the threshold shown.
      const consensus = await apiGet<{ comparison: { matched: number; missed: number; extra: number } }>(page, `/studies/${studyId}/batches/${batch}/consensus?period=1&threshold=0.15`);
      await expect
        .poll(async () => page.getByTestId('consensus-counts').innerText())
        .toMatch(new RegExp(`${consensus.comparison.matched}\\s+Matched\\s+${consensus.comparison.missed}\\s+Missed\\s+${consensus.comparison.extra}\\s+Extra`));
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});

describe('the Outbox entry', () => {
  for (const viewport of ['phone', 'desktop'] as const) {
    it(`shows only to a site admin on a server with the dev outbox (${viewport})`, async () => {
      const lead = await signedIn(viewport, 'lead@harbourside.example');
      try {
        const nav = lead.page.getByRole('navigation', { name: 'Main' });
        await nav.getByRole('link', { name: 'Account', exact: true }).waitFor();
        await lead.page.getByRole('link', { name: /^Open study / }).first().waitFor();
        expect(await nav.getByRole('link', { name: 'Outbox' }).count()).toBe(0);
        await screenshot(lead.page, 'nav-lead', viewport);
      } finally {
        await lead.close();
      }
      const admin = await signedIn(viewport, 'admin@harbourside.example');
      try {
        const nav = admin.page.getByRole('navigation', { name: 'Main' });
        await nav.getByRole('link', { name: 'Outbox' }).waitFor();
        await admin.page.getByRole('heading').first().waitFor();
        await screenshot(admin.page, 'nav-admin', viewport);
        // A server whose health answer lacks devOutbox (an older or a production one): no entry.
        await admin.page.route('**/api/health', (route) => route.fulfill({ status: 200, contentType: 'application/json', body: JSON.stringify({ ok: true, version: 'x' }) }));
        await admin.page.reload();
        await nav.getByRole('link', { name: 'Account', exact: true }).waitFor();
        await admin.page.waitForLoadState('networkidle');
        expect(await nav.getByRole('link', { name: 'Outbox' }).count()).toBe(0);
      } finally {
        await admin.close();
      }
    });
  }
});

describe('the web app files', () => {
  it('come compressed, hashed files immutable for a year, and the sign-in page loads only some route chunks', async () => {
    const b = await openBrowser('phone');
    try {
      const { page } = b;
      const seen: { path: string; encoding: string | undefined; cache: string | undefined }[] = [];
      page.on('response', async (res) => {
        const url = new URL(res.url());
        if (url.origin !== server.baseUrl) return;
        const h = await res.allHeaders();
        seen.push({ path: url.pathname, encoding: h['content-encoding'], cache: h['cache-control'] });
      });
      await page.goto(server.baseUrl + '/sign-in', { waitUntil: 'networkidle' });
      await page.getByRole('button', { name: 'Sign in', exact: true }).waitFor();
      const html = seen.find((r) => r.path === '/sign-in')!;
      expect(html.cache).toBe('no-cache');
      const scripts = seen.filter((r) => r.path.startsWith('/_expo/static/js/'));
      expect(scripts.length).toBeGreaterThan(1);
      for (const s of scripts) expect(s.cache, s.path).toBe('public, max-age=31536000, immutable');
      // Every script above the 1 kB threshold is compressed (br or gzip, whichever chromium prefers).
      const big = scripts.filter((s) => !/_layout-|sign-in-|__expo-metro-runtime/.test(s.path));
      expect(big.length).toBeGreaterThan(0);
      for (const s of big) expect(s.encoding, s.path).toMatch(/^(br|gzip)$/);
      // Route splitting: the export has more chunks than the sign-in page needs, and the compare
      // screen's chunk arrives only when that screen is opened.
      const { readdirSync } = await import('node:fs');
      const { join } = await import('node:path');
      const { DIST } = await import('./harness');
      const all = readdirSync(join(DIST, '_expo', 'static', 'js', 'web')).filter((f) => f.endsWith('.js'));
      expect(scripts.length).toBeLessThan(all.length);
      expect(scripts.some((s) => /\/compare-[0-9a-f]{32}\.js$/.test(s.path))).toBe(false);
      await signIn(page, 'stats@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');
      await page.goto(`${server.baseUrl}/studies/${studyId}/compare?batches=${demo.batchIds.join(',')}`);
      await page.getByTestId('compare-independence').waitFor();
      expect(seen.some((s) => /\/compare-[0-9a-f]{32}\.js$/.test(s.path))).toBe(true);
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});
