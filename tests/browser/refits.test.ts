/**
 * Re-fit studies in the exported web app (dist/): the lead starts a study from the demo's two fitted
 * models on a wide screen, watches its progress, and reads the distributions, the pair scatter, the
 * correlation grid and the table when it is done; then reads the same study on a phone; and cancels a
 * second, long study from the screen.
 *
 * Expected values come from outside the client: the fits' stored estimates (the generating values
 * the panels were simulated with) and the stored re-fit rows, read from the database.
 */
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedDemoResults, type DemoResults } from '../../server/demo/results';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { SCREENSHOTS, openBrowser, screenshot, signIn, startServer, type WavefitServer } from './harness';

let server: WavefitServer;
let demo: DemoResults;
let studyId: number;
let refitId = 0;

beforeAll(async () => {
  server = await startServer();
  studyId = server.seed.studyId;
  demo = await seedDemoResults(server.dataSource, studyId);
}, 600_000);
afterAll(async () => {
  await server?.close();
});

async function storedRefits(id: number): Promise<number> {
  const [row] = await server.dataSource.query(`SELECT COUNT(*) AS n FROM "refit_results" WHERE "refitId" = ?`, [id]);
  return Number(row.n);
}

describe('re-fit studies in the browser', () => {
  it('the lead starts a study from two fits on a wide screen, watches progress and reads the results', async () => {
    expect(demo.fitIds.length).toBe(2);
    const b = await openBrowser('desktop');
    try {
      const { page } = b;
      await page.goto(server.baseUrl + '/sign-in');
      await signIn(page, 'lead@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
      await page.goto(`${server.baseUrl}/studies/${studyId}/refits`);
      await page.getByTestId('refit-form').waitFor();
      for (const id of demo.fitIds) await page.getByTestId(`refit-fit-${id}`).click();
      // Too few panels: refused in the form, nothing stored.
      await page.getByTestId('refit-replications').fill('5');
      await page.getByText('Enter a whole number from 20 to 1000.').waitFor();
      await page.getByTestId('refit-replications').fill('20');
      await page.getByTestId('refit-seed').fill('2024');
      await screenshot(page, 'refit-start', 'desktop');
      await page.getByTestId('refit-start').click();
      await page.waitForURL((u) => /\/refits\/\d+$/.test(u.pathname));
      refitId = Number(new URL(page.url()).pathname.split('/').pop());
      const [row] = await server.dataSource.query(`SELECT "models", "replications", "seed" FROM "refits" WHERE "id" = ?`, [refitId]);
      expect(row.replications).toBe(20);
      expect(Number(row.seed)).toBe(2024);
      // Watching: the progress bar moves while it runs.
      await page.getByTestId('refit-progress').waitFor({ timeout: 30_000 });
      await page.getByText(/re-fits \(\d+%\)/).first().waitFor();
      // It moves: wait until the bar shows at least two stored re-fits, while the study still runs.
      const bar = page.getByTestId('refit-progress').locator('[role="progressbar"]');
      for (let t = 0; t < 600; t++) {
        const now = Number(await bar.getAttribute('aria-valuenow').catch(() => '0'));
        if (now >= 2) break;
        await page.waitForTimeout(250);
      }
      if (await page.getByTestId('refit-progress').count()) {
        expect(Number(await bar.getAttribute('aria-valuenow'))).toBeGreaterThanOrEqual(2);
        await screenshot(page, 'refit-progress', 'desktop');
      }
      await page.getByTestId('refit-panels').waitFor({ timeout: 400_000 });
      expect(await storedRefits(refitId)).toBe(40);

      // One panel per estimated parameter of the two models (the union of their keys).
      const models = JSON.parse(row.models) as { info: { keys: string[]; values: number[]; estimated: boolean[] } }[];
      const keys = new Set(models.flatMap((m) => m.info.keys.filter((_, k) => m.info.estimated[k])));
      for (const key of keys) await expect(page.getByTestId(`panel-${key}`).count()).resolves.toBe(1);
      // The generating value named under a panel is the fit's stored estimate.
      const density = models[0].info.values[models[0].info.keys.indexOf('density')];
      await expect(page.getByTestId('panel-density').getByText(`generating value ${density.toFixed(2)}`).first().count()).resolves.toBe(1);
      await page.getByTestId('pair-r').waitFor();
      await expect(page.getByTestId('pair-r').textContent()).resolves.toMatch(/^r = -?\d\.\d\d over \d+ re-fits/);
      await page.getByTestId('refit-cautions').getByText(/of 20 re-fits converged/).first().waitFor();
      // The page scrolls inside the app's own view, so take each part by itself.
      await page.getByTestId('refit-panels').screenshot({ path: join(SCREENSHOTS, 'refit-panels-wide-1440.png') });
      await page.getByTestId('refit-pair').screenshot({ path: join(SCREENSHOTS, 'refit-pair-wide-1440.png') });
      await page.getByTestId('refit-correlations').screenshot({ path: join(SCREENSHOTS, 'refit-correlations-wide-1440.png') });
      await page.getByTestId('refit-table-0-0').screenshot({ path: join(SCREENSHOTS, 'refit-table-wide-1440.png') });
      // Side by side on a wide screen: the first two panels share a row.
      const p1 = await page.getByTestId('panel-rate:1').boundingBox();
      const p2 = await page.getByTestId('panel-rate:2').boundingBox();
      expect(Math.abs(p1!.y - p2!.y)).toBeLessThan(2);
      expect(p2!.x).toBeGreaterThan(p1!.x + p1!.width - 1);
    } finally {
      await b.close();
    }
  }, 600_000);

  it('reads the same study on a phone: panels stacked, the table as cards', async () => {
    expect(refitId).toBeGreaterThan(0);
    const b = await openBrowser('phone');
    try {
      const { page } = b;
      await page.goto(server.baseUrl + '/sign-in');
      await signIn(page, 'lead@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
      await page.goto(`${server.baseUrl}/studies/${studyId}/refits/${refitId}`);
      await page.getByTestId('panel-density').waitFor({ timeout: 60_000 });
      await page.getByTestId('panel-density').scrollIntoViewIfNeeded();
      await screenshot(page, 'refit-panel', 'phone');
      // Stacked: the second panel sits below the first, not beside it.
      const first = await page.getByTestId('panel-rate:1').boundingBox();
      const second = await page.getByTestId('panel-rate:2').boundingBox();
      expect(second!.y).toBeGreaterThan(first!.y + first!.height - 1);
      await page.getByTestId('refit-table-0-0').scrollIntoViewIfNeeded();
      await screenshot(page, 'refit-table', 'phone');
      await page.getByTestId('refit-pair').scrollIntoViewIfNeeded();
      await screenshot(page, 'refit-pair', 'phone');
    } finally {
      await b.close();
    }
  }, 300_000);

  it('the lead cancels a long study from its screen', async () => {
    const b = await openBrowser('phone');
    try {
      const { page } = b;
      await page.goto(server.baseUrl + '/sign-in');
      await signIn(page, 'lead@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
      await page.goto(`${server.baseUrl}/studies/${studyId}/refits?fits=${demo.fitIds[0]}`);
      await page.getByTestId('refit-form').waitFor();
      await expect(page.getByTestId(`refit-fit-${demo.fitIds[0]}`).getAttribute('aria-checked')).resolves.toBe('true');
      await page.getByTestId('refit-replications').fill('1000');
      await page.getByTestId('refit-start').click();
      await page.waitForURL((u) => /\/refits\/\d+$/.test(u.pathname));
      const id = Number(new URL(page.url()).pathname.split('/').pop());
      await page.getByTestId('refit-cancel').click();
      await page.getByText('Cancelled').first().waitFor({ timeout: 30_000 });
      const [job] = await server.dataSource.query(`SELECT j."state" FROM "jobs" j JOIN "refits" r ON r."jobId" = j."id" WHERE r."id" = ?`, [id]);
      expect(job.state).toBe('cancelled');
      await screenshot(page, 'refit-cancelled', 'phone');
    } finally {
      await b.close();
    }
  }, 300_000);
});
