/**
 * The model form in the exported web app (dist/): its effect picker shows every effect of the
 * catalogue (shared/effects.ts) and offers a covariate effect only with covariates of the kind it needs,
 * an empty name is refused with nothing stored, and a saved model holds exactly the rows ticked.
 *
 * Expected values come from outside the client: the effect catalogue, the demo study's actors file
 * (server/demo/waves.ts: one categorical covariate, "watch"; years_of_service is numeric) and the
 * stored row read from the database.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { EFFECT_CATALOGUE } from '../../shared/effects';
import { openBrowser, screenshot, signIn, startServer, type ViewportName, type WavefitServer } from './harness';

let server: WavefitServer;

beforeAll(async () => {
  server = await startServer();
});
afterAll(async () => {
  await server?.close();
});

async function modelCount(): Promise<number> {
  const [row] = await server.dataSource.query(`SELECT COUNT(*) AS n FROM "model_specs"`);
  return Number(row.n);
}

describe.each<ViewportName>(['desktop', 'phone'])('the model form at the %s width', (viewport) => {
  it('lists every effect, offers covariate effects only with covariates of their kind, refuses an empty name and saves what was ticked', async () => {
    const b = await openBrowser(viewport);
    try {
      const { page } = b;
      await page.goto(server.baseUrl + '/sign-in');
      await signIn(page, 'stats@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
      await page.goto(`${server.baseUrl}/studies/${server.seed.studyId}/models/new`);
      await page.getByTestId('model-form').waitFor();
      await page.getByTestId('effect-density').waitFor();

      for (const info of EFFECT_CATALOGUE) await expect(page.getByTestId(`effect-group-${info.id}`).count()).resolves.toBe(1);
      // same_covariate needs a categorical covariate: the demo has one (watch), not the numeric years.
      await expect(page.getByTestId('effect-same_covariate:watch').count()).resolves.toBe(1);
      await expect(page.getByTestId('effect-same_covariate:years_of_service').count()).resolves.toBe(0);
      // covariate_ego needs a numeric one: years of service yes, watch no.
      await expect(page.getByTestId('effect-covariate_ego:years_of_service').count()).resolves.toBe(1);
      await expect(page.getByTestId('effect-covariate_ego:watch').count()).resolves.toBe(0);
      // density and reciprocity start ticked.
      await expect(page.getByTestId('effect-density').getAttribute('aria-checked')).resolves.toBe('true');
      await expect(page.getByTestId('effect-transitive_triplets').getAttribute('aria-checked')).resolves.toBe('false');

      await page.getByTestId('effect-transitive_triplets').click();
      await page.getByTestId('effect-same_covariate:watch').click();
      await expect(page.getByTestId('effect-transitive_triplets').getAttribute('aria-checked')).resolves.toBe('true');
      await page.getByTestId(`effect-value-transitive_triplets`).waitFor();

      // No name: refused in the form, nothing stored.
      const before = await modelCount();
      await page.getByTestId('model-save').click();
      await page.getByRole('alert').first().waitFor();
      expect(page.url()).toMatch(/\/models\/new$/);
      expect(await modelCount()).toBe(before);
      await screenshot(page, 'model-form', viewport);

      const name = `Watch and closure (${viewport})`;
      await page.getByTestId('model-name').fill(name);
      await page.getByTestId('model-save').click();
      await page.waitForURL(/\/models\/\d+$/);
      expect(await modelCount()).toBe(before + 1);
      const [row] = await server.dataSource.query(`SELECT "spec" FROM "model_specs" WHERE "name" = ?`, [name]);
      const spec = JSON.parse(row.spec) as { effects: { id: string; covariate?: string }[] };
      expect(spec.effects.map((e) => (e.covariate ? `${e.id}:${e.covariate}` : e.id)).sort()).toEqual(
        ['density', 'reciprocity', 'same_covariate:watch', 'transitive_triplets'].sort(),
      );
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});
