/**
 * A statistician starts a study of their own from the browser (Debian's chromium against the real
 * server), on a phone (390 x 844) and a desktop (1440 x 900), with no API shortcut:
 * creates a study, picks three wave files and an actors file through the file picker, reads the
 * preview, finds the error beside its line in a deliberately wrong wave file, picks the corrected
 * file, stores, reads the waves screen (figures checked against the API and against networkx for
 * density and reciprocity), fits a model and queues a batch through the existing screens.
 * The fixture files (tests/browser/fixtures/harbour) are invented Harbourside crew data.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { StudyDataResponse } from '../../shared/data';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { stopJobQueue } from '../../server/jobs';
import { openBrowser, screenshot, signIn, startServer, type ViewportName, type WavefitServer } from './harness';

const FIXTURES = join(__dirname, 'fixtures', 'harbour');
const file = (name: string) => readFileSync(join(FIXTURES, name), 'utf8');
const STATS = 'stats@harbourside.example';

let server: WavefitServer;
beforeAll(async () => {
  server = await startServer();
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

async function storedRows(studyId: number): Promise<number> {
  const q = async (t: string) => Number((await server.dataSource.query(`SELECT COUNT(*) AS n FROM ${t} WHERE "studyId" = ?`, [studyId]))[0].n);
  return (await q('actors')) + (await q('waves')) + (await q('covariates'));
}

/** density and overall reciprocity of the fixture waves by networkx (Hagberg, Schult & Swart 2008, networkx). */
function networkxFigures(): Array<{ density: number; reciprocity: number; ties: number }> {
  const script = `
import sys, json, networkx as nx
actors = [l.split(',')[0] for l in open(sys.argv[1]).read().strip().split('\\n')[1:]]
out = []
for f in sys.argv[2:]:
    g = nx.DiGraph(); g.add_nodes_from(actors)
    g.add_edges_from(tuple(l.split(',')) for l in open(f).read().strip().split('\\n')[1:])
    out.append({'density': nx.density(g), 'reciprocity': nx.overall_reciprocity(g), 'ties': g.number_of_edges()})
print(json.dumps(out))`;
  const files = ['wave1.csv', 'wave2.csv', 'wave3.csv'].map((f) => join(FIXTURES, f));
  return JSON.parse(execFileSync('/usr/bin/python3', ['-c', script, join(FIXTURES, 'actors.csv'), ...files], { encoding: 'utf8' }));
}

describe.each<ViewportName>(['phone', 'desktop'])('a statistician on a %s', (viewport) => {
  it('creates a study, uploads through the file picker, fixes a wrong file, stores, reads the waves, fits and queues a batch', async () => {
    const b = await openBrowser(viewport);
    try {
      const { page } = b;
      await page.goto(`${server.baseUrl}/sign-in`);
      await signIn(page, STATS, DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');

      // A new study; its Data card leads to the upload.
      await page.goto(`${server.baseUrl}/studies/new`);
      const name = `Quay watch ${viewport}`;
      await page.getByLabel('Name', { exact: true }).fill(name);
      await page.getByRole('button', { name: 'Create study' }).click();
      await page.waitForURL(/\/studies\/\d+$/);
      const studyId = Number(new URL(page.url()).pathname.split('/')[2]);
      const dataCard = page.getByTestId('section-data');
      await dataCard.getByText('No data stored yet.').waitFor();
      await dataCard.getByRole('link', { name: 'Upload data' }).click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/data/upload$`));

      // Three waves and the actors file at once; wave 2 has a typo on line 7 ("Wrne" for "Wren").
      const bad = file('wave2.csv').split('\n');
      expect(bad[6]).toBe('Pim,Wren');
      bad[6] = 'Pim,Wrne';
      await page.getByTestId('file-input').setInputFiles([
        { name: 'wave1.csv', mimeType: 'text/csv', buffer: Buffer.from(file('wave1.csv')) },
        { name: 'wave2.csv', mimeType: 'text/csv', buffer: Buffer.from(bad.join('\n')) },
        { name: 'wave3.csv', mimeType: 'text/csv', buffer: Buffer.from(file('wave3.csv')) },
        { name: 'actors.csv', mimeType: 'text/csv', buffer: Buffer.from(file('actors.csv')) },
      ]);
      // Roles come from the names: waves 1-3 and the actors file.
      for (const [f, role] of [['wave1.csv', 'Wave 1'], ['wave2.csv', 'Wave 2'], ['wave3.csv', 'Wave 3'], ['actors.csv', 'Actors file']]) {
        const chip = page.getByTestId(`upload-entry-${f}`).getByRole('radio', { name: role, exact: true });
        expect(await chip.getAttribute('aria-checked'), f).toBe('true');
      }
      const problem = page.getByTestId('upload-entry-wave2.csv').getByTestId('upload-problem');
      await problem.waitFor();
      expect(await problem.count()).toBe(1);
      await expect.poll(() => problem.innerText()).toContain('Line 7, column 2');
      expect(await problem.getByTestId('upload-problem-line').innerText()).toContain('Pim,Wrne');
      expect(await problem.innerText()).toContain('Unknown actor "Wrne": not in the actors file.');
      expect(await page.getByTestId('store-data').isDisabled()).toBe(true);
      await problem.scrollIntoViewIfNeeded();
      await screenshot(page, 'data-upload-problem', viewport);
      expect(await storedRows(studyId)).toBe(0);

      // The corrected file, picked again under the same name, replaces the wrong one.
      await page.getByTestId('file-input').setInputFiles([{ name: 'wave2.csv', mimeType: 'text/csv', buffer: Buffer.from(file('wave2.csv')) }]);
      const preview = page.getByTestId('upload-preview');
      await preview.waitFor();
      expect(await page.getByTestId('upload-problem').count()).toBe(0);
      expect(await preview.innerText()).toContain('12 actors, 3 waves, 3 covariates.');
      const expected = networkxFigures();
      for (let k = 0; k < 3; k++) {
        expect(await page.getByTestId(`preview-wave-${k + 1}`).innerText()).toContain(`${expected[k].ties} ties, density ${expected[k].density.toFixed(3)}`);
      }
      expect(await page.getByTestId('preview-covariate-watch').innerText()).toMatch(/watch: categorical, constant — Heron, Kestrel, Puffin/);
      expect(await page.getByTestId('preview-covariate-drills').innerText()).toMatch(/drills: numeric, changing per wave \(2 columns\)/);
      expect(await page.getByTestId('preview-covariate-years').innerText()).toMatch(/years: numeric, constant/);
      await preview.scrollIntoViewIfNeeded();
      await screenshot(page, 'data-upload-preview', viewport);
      expect(await storedRows(studyId)).toBe(0);

      // One action stores, and the waves screen opens.
      await page.getByTestId('store-data').click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/data\\?stored=1$`));
      await page.getByTestId('stored-banner').waitFor();
      const data = await apiGet<StudyDataResponse>(page, `/studies/${studyId}/data`);
      expect(data.waves.map((w) => w.ties)).toEqual(expected.map((e) => e.ties));
      data.waves.forEach((w, k) => {
        expect(w.density).toBeCloseTo(expected[k].density, 12);
        expect(w.reciprocity).toBeCloseTo(expected[k].reciprocity, 12);
      });
      const table = page.getByTestId('waves-table');
      for (const w of data.waves) {
        const text = await table.innerText();
        expect(text).toContain(w.density.toFixed(3));
        expect(text).toContain((w.ties / w.actors).toFixed(2));
      }
      const changes = await page.getByTestId('changes-table').innerText();
      for (const c of data.changes) expect(changes).toContain(c.jaccard!.toFixed(2));
      for (let k = 1; k <= 3; k++) await page.getByTestId(`wave-drawing-${k}`).locator('svg').waitFor();
      await page.getByTestId('covariates-table').waitFor();
      await screenshot(page, 'data-waves', viewport);
      await page.getByTestId('wave-drawings').scrollIntoViewIfNeeded();
      await screenshot(page, 'data-waves-drawn', viewport);
      if (viewport === 'desktop') {
        // wide: the three drawings stand side by side in one row
        const boxes = await Promise.all([1, 2, 3].map((k) => page.getByTestId(`wave-drawing-${k}`).boundingBox()));
        expect(Math.abs(boxes[0]!.y - boxes[2]!.y)).toBeLessThan(2);
        expect(boxes[2]!.x).toBeGreaterThan(boxes[1]!.x);
      } else {
        const boxes = await Promise.all([1, 2].map((k) => page.getByTestId(`wave-drawing-${k}`).boundingBox()));
        expect(boxes[1]!.y).toBeGreaterThan(boxes[0]!.y + boxes[0]!.height - 1);
      }

      // A model through the model screens, fitted.
      await page.goto(`${server.baseUrl}/studies/${studyId}/models`);
      await page.getByTestId('model-new').click();
      await page.getByTestId('model-name').waitFor();
      await page.getByTestId('model-name').fill('Crew baseline');
      await page.getByTestId('model-save').click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/models/\\d+$`));
      await page.getByTestId('fit-start').click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/models/\\d+/fits/\\d+$`));
      const fitUrl = page.url();
      await page.locator('[data-testid="fit-converged"], [data-testid="fit-not-converged"]').first().waitFor({ timeout: 150_000 });
      await screenshot(page, 'data-fit', viewport);

      // A batch from that fit through the batch screens.
      await page.goto(`${server.baseUrl}/studies/${studyId}/batches/new`);
      await page.getByTestId('batch-start').click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/batches/\\d+$`));
      const batchId = Number(new URL(page.url()).pathname.split('/').at(-1));
      const rows = await server.dataSource.query('SELECT "fitId", "actorCount" FROM batches WHERE id = ?', [batchId]);
      expect(rows[0].actorCount).toBe(12);
      expect(rows[0].fitId).not.toBeNull();
      await screenshot(page, 'data-batch', viewport);

      // Replacing the data now: the screen says what becomes stale and stores only after the tick.
      for (let i = 0; i < 300; i++) {
        const { batch } = await apiGet<{ batch: { state: string } }>(page, `/studies/${studyId}/batches/${batchId}`);
        if (batch.state !== 'queued' && batch.state !== 'running') break;
        await page.waitForTimeout(200);
      }
      await page.goto(`${server.baseUrl}/studies/${studyId}/data`);
      await page.getByRole('button', { name: 'Upload new data' }).click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/data/upload$`));
      await page.getByTestId('file-input').setInputFiles(
        ['wave1.csv', 'wave2.csv', 'actors.csv'].map((f) => ({ name: f, mimeType: 'text/csv', buffer: Buffer.from(file(f)) })),
      );
      await page.getByTestId('upload-preview').waitFor();
      const warning = page.getByTestId('replace-warning');
      await expect.poll(() => warning.innerText()).toContain('1 model, 1 fit, 1 batch were built on the data stored now.');
      expect(await page.getByTestId('store-data').isDisabled()).toBe(true);
      await warning.scrollIntoViewIfNeeded();
      await screenshot(page, 'data-replace-confirm', viewport);
      await page.getByTestId('confirm-replace').click();
      await page.getByTestId('store-data').click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/data\\?stored=1$`));
      await page.getByTestId('stored-banner').getByText('Stored 2 waves of 12 actors and 3 covariates.').waitFor();
      // the fit and the batch made on the old data now say so
      await page.goto(fitUrl);
      await page.getByTestId('stale-data').getByText(/after this fit was made: its estimates describe the old data/).waitFor();
      await page.goto(`${server.baseUrl}/studies/${studyId}/batches/${batchId}`);
      await page.getByTestId('stale-data').getByText(/after this batch was made/).waitFor();
      await screenshot(page, 'data-stale-batch', viewport);
      await page.goto(`${server.baseUrl}/studies/${studyId}/batches`);
      await page.getByTestId(`batch-${batchId}`).getByText('Stale data').waitFor();
      await page.goto(`${server.baseUrl}/studies/${studyId}/models`);
      await page.getByTestId('model-table').getByText('Stale data').waitFor();
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});

describe('fixed pairs and changing composition on a phone', () => {
  it('uploads them with the waves, and the waves screen shows them', async () => {
    const b = await openBrowser('phone');
    try {
      const { page } = b;
      await page.goto(`${server.baseUrl}/sign-in`);
      await signIn(page, STATS, DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');
      await page.goto(`${server.baseUrl}/studies/new`);
      await page.getByLabel('Name', { exact: true }).fill('Quay watch with newcomers');
      await page.getByRole('button', { name: 'Create study' }).click();
      await page.waitForURL(/\/studies\/\d+$/);
      const studyId = Number(new URL(page.url()).pathname.split('/')[2]);
      await page.goto(`${server.baseUrl}/studies/${studyId}/data/upload`);
      // Zeno joins at wave 2 (no ties in wave 1); Maren never advises Zeno (a structural zero).
      const w1 = file('wave1.csv').split('\n').filter((l) => !l.includes('Zeno')).join('\n');
      const actors = file('actors.csv')
        .split('\n')
        .map((l, k) => (l === '' ? l : k === 0 ? `${l},present@1,present@2,present@3` : `${l},${l.startsWith('Zeno,') ? 0 : 1},1,1`))
        .join('\n');
      const fixed = 'sender,receiver,value,waves\nMaren,Zeno,0,\n';
      expect(file('wave2.csv') + file('wave3.csv')).not.toContain('Maren,Zeno');
      await page.getByTestId('file-input').setInputFiles([
        { name: 'wave1.csv', mimeType: 'text/csv', buffer: Buffer.from(w1) },
        { name: 'wave2.csv', mimeType: 'text/csv', buffer: Buffer.from(file('wave2.csv')) },
        { name: 'wave3.csv', mimeType: 'text/csv', buffer: Buffer.from(file('wave3.csv')) },
        { name: 'actors.csv', mimeType: 'text/csv', buffer: Buffer.from(actors) },
        { name: 'fixed-pairs.csv', mimeType: 'text/csv', buffer: Buffer.from(fixed) },
      ]);
      const preview = page.getByTestId('upload-preview');
      await preview.waitFor();
      expect(await preview.innerText()).toContain('12 actors, 3 waves, 3 covariates, 1 fixed pair.');
      expect(await page.getByTestId('preview-wave-1').innerText()).toContain('1 actor not present');
      await page.getByTestId('store-data').click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/data\\?stored=1$`));
      const fixedCard = page.getByTestId('fixed-pairs');
      await fixedCard.waitFor();
      expect(await fixedCard.innerText()).toMatch(/Maren\s*→\s*Zeno: never a tie at waves 1, 2, 3/);
      expect(await page.getByTestId('presence').innerText()).toMatch(/Zeno: present at waves 2, 3/);
      // the waves table counts only present actors at wave 1
      const data = await apiGet<StudyDataResponse>(page, `/studies/${studyId}/data`);
      expect(data.waves[0].absent).toBe(1);
      expect(data.waves[0].density).toBeCloseTo(data.waves[0].ties / (11 * 10), 12);
      await page.getByTestId('wave-drawing-1').locator('svg').waitFor();
      await page.getByTestId('fixed-pairs').scrollIntoViewIfNeeded();
      await screenshot(page, 'data-fixed-presence', 'phone');
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});
