/**
 * Bad input on the upload screen (Debian's chromium, the real server): every kind of malformed file
 * that the upload code (server/data/csv.ts, parse.ts) and the screen (features/data/upload.ts) name
 * gets its message on screen, beside its file, and nothing is stored. Files are chosen through the
 * file picker, several rounds in one page; the expected texts are the messages written in that code.
 * Also: the reviewer sees the upload read-only, a low Jaccard index draws the caution in the preview,
 * and the README tour's Data step (README.md "A short tour", step 2) is checked on the demo study.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/seed';
import { openBrowser, screenshot, signIn, startServer, type WavefitServer } from './harness';

let server: WavefitServer;
beforeAll(async () => {
  server = await startServer();
});
afterAll(async () => server?.close());

const ACTORS = 'label,years\nAri,3\nBex,12\nCato,1\n';
const W = (rows: string) => `sender,receiver\n${rows}`;
type F = [name: string, content: string];

async function storedRows(studyId: number): Promise<number> {
  const q = async (t: string) => Number((await server.dataSource.query(`SELECT COUNT(*) AS n FROM ${t} WHERE "studyId" = ?`, [studyId]))[0].n);
  return (await q('actors')) + (await q('waves')) + (await q('covariates'));
}

/** Empties the screen, picks the files, and waits until the preview has answered. */
async function pick(page: Page, files: F[]) {
  const removeAll = page.getByTestId('remove-all');
  if (await removeAll.count()) await removeAll.click();
  else if (await page.getByRole('button', { name: /^Remove / }).count()) await page.getByRole('button', { name: /^Remove / }).click();
  await page.getByTestId('file-input').setInputFiles(files.map(([name, content]) => ({ name, mimeType: 'text/csv', buffer: Buffer.from(content) })));
  await page.waitForFunction(() => !document.body.innerText.includes('Reading the files…'));
  await page.waitForTimeout(350);
  await page.waitForFunction(() => !document.body.innerText.includes('Reading the files…'));
}

/** Each expected message is on screen inside the card of its file (or the general list), and storing is off. */
async function expectProblems(page: Page, expected: Array<[file: string | null, text: string]>) {
  for (const [file, text] of expected) {
    const scope = file ? page.getByTestId(`upload-entry-${file}`) : page.getByTestId('upload-problems');
    await expect.poll(async () => (await scope.innerText()).includes(text), { message: `${file ?? 'upload'}: ${text}`, timeout: 10_000 }).toBe(true);
  }
  expect(await page.getByTestId('store-data').isDisabled()).toBe(true);
}

describe('bad input on the upload screen', () => {
  it('shows the message of every kind of malformed file beside it, and stores nothing', async () => {
    const b = await openBrowser('desktop');
    try {
      const { page } = b;
      await page.goto(`${server.baseUrl}/sign-in`);
      await signIn(page, 'stats@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');
      await page.goto(`${server.baseUrl}/studies/new`);
      await page.getByLabel('Name', { exact: true }).fill('Broken files');
      await page.getByRole('button', { name: 'Create study' }).click();
      await page.waitForURL(/\/studies\/\d+$/);
      const studyId = Number(new URL(page.url()).pathname.split('/')[2]);
      await page.goto(`${server.baseUrl}/studies/${studyId}/data/upload`);
      await page.getByTestId('choose-files').waitFor();

      // CSV syntax and edge lists
      await pick(page, [
        ['wave1.csv', W('"Ari,Bex\n"Ari"x,Bex\nAri,Cato\n')],
        ['wave2.csv', W(`Ari\nAri,Ari\nAri,Bex,7\nBex,Cato\nBex,Cato\n,Bex\n${'L'.repeat(61)},Bex\nAri,Zed\n`)],
        ['wave3.csv', ''],
        ['actors.csv', ACTORS],
      ]);
      await expectProblems(page, [
        ['wave1.csv', 'A quoted field is not closed with " on this line.'],
        ['wave1.csv', 'Unexpected text after a closing quote.'],
        ['wave2.csv', 'Expected "sender,receiver" (and optionally a value); this line has 1 field.'],
        ['wave2.csv', 'Self-tie: "Ari" names themself; ties to oneself are not allowed.'],
        ['wave2.csv', 'The value "7" is not 0, 1 or the missing marker "NA".'],
        ['wave2.csv', 'Duplicate tie "Bex" → "Cato" (first on line 5).'],
        ['wave2.csv', 'The actor label is empty.'],
        ['wave2.csv', 'has 61 characters; at most 60 are allowed.'],
        ['wave2.csv', 'Unknown actor "Zed": not in the actors file.'],
        ['wave3.csv', 'The file is empty.'],
      ]);
      await page.getByTestId('upload-entry-wave2.csv').scrollIntoViewIfNeeded();
      await screenshot(page, 'data-bad-edge-lists', 'desktop');

      // the actors file: header problems, then body problems
      await pick(page, [
        ['wave1.csv', W('Ari,Bex\n')],
        ['wave2.csv', W('Bex,Ari\n')],
        ['actors.csv', 'label,years,years,rank,rank@1,drills@1,drills@3\nAri,1,1,a,b,1,2\nAri,2,2,a,b,1,2\nBex,3\n'],
      ]);
      await expectProblems(page, [
        ['actors.csv', 'The column "years" appears twice (first in column 2).'],
        ['actors.csv', '"rank" is both a constant column and a changing one ("rank@…"); use one form.'],
        ['actors.csv', 'The changing covariate "drills" needs one column per wave, "drills@1" to "drills@1" (or to @2); found @1, @3.'],
        ['actors.csv', 'Duplicate actor label "Ari" (first on line 2).'],
        ['actors.csv', 'This line has 2 fields; the header has 7.'],
      ]);
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['wave2.csv', W('Bex,Ari\n')], ['actors.csv', 'name,years\nAri,1\n']]);
      await expectProblems(page, [['actors.csv', 'The first line must be a header whose first column is "label" (found "name").']]);
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['wave2.csv', W('Bex,Ari\n')], ['actors.csv', 'label,years\n']]);
      await expectProblems(page, [['actors.csv', 'The actors file has a header but no actors.']]);
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['wave2.csv', W('Bex,Ari\n')], ['actors.csv', 'label,notes\nAri,NA\nBex,\n']]);
      await expectProblems(page, [['actors.csv', 'The covariate "notes" has no observed values.']]);
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['wave2.csv', W('Bex,Ari\n')], ['actors.csv', 'label,present\nAri,1\nBex,1\n']]);
      await expectProblems(page, [
        ['actors.csv', '"present" is the name of the presence columns; give one per wave, "present@1" to "present@2", with 1 (present) or 0 (absent).'],
      ]);

      // matrices: wave 1 is good and sets the actors; every other wave has one kind of problem
      const good = ',A,B,C\nA,0,1,0\nB,0,0,1\nC,1,0,0\n';
      await pick(page, [
        ['wave1.csv', good],
        ['wave2.csv', ',A,B,A\nA,0,1,0\nB,0,0,1\nA,1,0,0\n'],
        ['wave3.csv', ',A,B,C\nA,0,1,0\nB,0,0,1\n'],
        ['wave4.csv', ',A,B,C\nA,0,1,0\nC,0,0,1\nB,1,0,0\n'],
        ['wave5.csv', ',A,B,C\nA,0,1\nB,0,0,1\nC,1,0,0\n'],
        ['wave6.csv', ',A,B,C\nA,1,x,0\nB,0,0,1\nC,1,0,0\n'],
        ['wave7.csv', 'corner\n'],
        ['wave8.csv', ',A,B\nA,0,1\nB,1,0\n'],
        ['wave9.csv', ',A,B,D\nA,0,1,0\nB,0,0,1\nD,1,0,0\n'],
      ]);
      expect(await page.getByRole('radio', { name: '0/1 matrices' }).getAttribute('aria-checked')).toBe('true');
      await expectProblems(page, [
        ['wave2.csv', 'Duplicate actor label "A" in the first row (first in column 2).'],
        ['wave3.csv', 'The matrix is not square: the first row names 3 actors but 2 rows follow.'],
        ['wave4.csv', 'The row label "C" differs from the column label "B" in the same position; rows and columns must list the actors in the same order.'],
        ['wave5.csv', 'The matrix is not square: this row has 2 values for 3 columns.'],
        ['wave6.csv', 'The value "x" is not 0, 1 or the missing marker "NA".'],
        ['wave6.csv', 'Self-tie: the diagonal cell of "A" is 1; ties to oneself are not allowed.'],
        ['wave7.csv', 'The first row must hold the actor labels, after one corner cell.'],
        ['wave8.csv', 'The wave has 2 actors but wave "wave1" (wave1.csv) has 3; every wave must cover the same actors.'],
        ['wave9.csv', 'Unknown actor "D": not in wave "wave1" (wave1.csv).'],
      ]);
      await screenshot(page, 'data-bad-matrices', 'desktop');

      // the upload as a whole
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['actors.csv', ACTORS]]);
      await expectProblems(page, [[null, 'Upload at least two waves; one was given.']]);
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['wave2.csv', W('Bex,Ari\n')]]);
      await page.getByLabel('Label of wave 2', { exact: true }).fill('wave1');
      await expectProblems(page, [['wave2.csv', 'Two waves are labelled "wave1" (waves 1 and 2).']]);
      await page.getByLabel('Label of wave 2', { exact: true }).fill('');
      await expectProblems(page, [['wave2.csv', 'Wave 2 needs a label.']]);
      await pick(page, [['wave1.csv', 'sender,receiver\n'], ['wave2.csv', 'sender,receiver\n'], ['actors.csv', 'label\nAri\n']]);
      await expectProblems(page, [[null, 'A network needs at least 2 actors; found 1.']]);
      await pick(page, [['wave1.csv', 'sender,receiver\n'], ['wave2.csv', 'sender,receiver\n'], ['actors.csv', `label\n${Array.from({ length: 1001 }, (_, k) => `crew${k}`).join('\n')}\n`]]);
      await expectProblems(page, [[null, 'At most 1000 actors are supported; found 1001.']]);

      // roles that clash and a file too large, found by the screen before asking the server
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['wave2.csv', W('Bex,Ari\n')], ['actors.csv', ACTORS], ['crew.csv', ACTORS]]);
      await expectProblems(page, [['crew.csv', 'Only one actors file can be used; actors.csv and crew.csv are both marked as actors files.']]);
      await page.getByTestId('upload-entry-wave2.csv').getByRole('radio', { name: 'Wave 1', exact: true }).click();
      await expectProblems(page, [['wave2.csv', 'Two files are wave 1 (wave1.csv and wave2.csv); give each wave its own number.']]);
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['wave2.csv', `sender,receiver\n${'Ari,Bex\n'.repeat(275_000)}`]]);
      await expectProblems(page, [['wave2.csv', 'The file has 2.1 MB; at most 2 MB are allowed per file.']]);

      // fixed pairs and presence
      const actorsPresent = 'label,present@1,present@2\nAri,1,1\nBex,1,1\nCato,0,1\n';
      await pick(page, [
        ['wave1.csv', W('Ari,Bex\nCato,Ari\n')],
        ['wave2.csv', W('Bex,Ari\nBex,Cato\n')],
        ['actors.csv', actorsPresent],
        ['fixed-pairs.csv', 'sender,receiver,value,waves\nAri,Bex,0,1\nAri,Zed,0\nBex,Bex,0\nBex,Ari,5\nCato,Bex,0,3\nCato,Ari,1,one\nAri,Cato,0,1\nAri,Cato,0,1-2\nAri,Bex\n'],
      ]);
      await expectProblems(page, [
        ['wave1.csv', '"Cato" is not present at wave 1 (present@1 is 0 in the actors file), so this tie cannot be there.'],
        ['fixed-pairs.csv', 'Unknown actor "Zed": not among the actors of the upload.'],
        ['fixed-pairs.csv', '"Bex" is paired with themself; ties to oneself never exist, so they need no fixing.'],
        ['fixed-pairs.csv', 'The fixed value "5" is not 0 (never a tie) or 1 (always a tie).'],
        ['fixed-pairs.csv', 'Waves "3" do not exist: the upload has waves 1 to 2.'],
        ['fixed-pairs.csv', '"one" is not a list of waves; write e.g. "2-3" or "1 3", or leave it empty for every wave.'],
        ['fixed-pairs.csv', 'The pair "Ari" → "Cato" is fixed twice at wave 1 (first on line 8).'],
        ['fixed-pairs.csv', 'Expected "sender,receiver,value" and optionally the waves; this line has 2 fields.'],
      ]);
      await pick(page, [
        ['wave1.csv', W('Ari,Bex\n')],
        ['wave2.csv', W('Bex,Ari\nAri,Bex\n')],
        ['actors.csv', 'label,present@1,present@2\nAri,1,1\nBex,1,1\nCato,0,yes\n'],
        ['fixed-pairs.csv', 'Ari,Bex,0,1-2\n'],
      ]);
      await expectProblems(page, [
        ['actors.csv', '"present@2" of "Cato" is "yes"; write 1 (present at wave 2) or 0 (absent).'],
        ['fixed-pairs.csv', 'The pair "Ari" → "Bex" is fixed at 0 (never a tie), but wave 1 has this tie.'],
      ]);
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['wave2.csv', W('Bex,Ari\n')], ['actors.csv', 'label,present@1,present@2\nAri,1,1\nBex,0,1\nCato,0,1\n']]);
      await expectProblems(page, [['actors.csv', 'Only 1 actor is present at wave 1; a wave needs at least 2.']]);
      await pick(page, [['wave1.csv', W('Ari,Bex\n')], ['wave2.csv', W('Bex,Ari\n')], ['actors.csv', 'label,present@1\nAri,1\nBex,1\n']]);
      await expectProblems(page, [['actors.csv', 'The presence columns must be "present@1" to "present@2", one per wave; found @1.']]);

      expect(await storedRows(studyId)).toBe(0);
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});

describe('the README tour, step 2 (Data), and the reviewer', () => {
  it('the lead opens the demo waves from the Data card; a reviewer sees the upload read-only; a low Jaccard index is cautioned', async () => {
    const b = await openBrowser('desktop');
    try {
      const { page } = b;
      const studyId = server.seed.studyId;
      await page.goto(`${server.baseUrl}/sign-in`);
      await signIn(page, 'lead@harbourside.example', DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');
      await page.goto(`${server.baseUrl}/studies/${studyId}`);
      await page.getByTestId('section-data').getByText('3 waves of 24 actors stored.').waitFor();
      await page.getByTestId('section-data').getByRole('link', { name: 'Open the waves' }).click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/data$`));
      // "the three uploaded waves (actors, ties, density, reciprocity)"
      const waves = page.getByRole('table', { name: 'Waves', exact: true });
      await waves.waitFor();
      for (const h of ['Actors', 'Ties', 'Density', 'Reciprocity', 'Mean degree', 'Not observed']) await waves.getByText(h, { exact: true }).waitFor();
      expect(await waves.getByRole('row').count()).toBe(4);
      // "the change between waves (ties created and dissolved, Hamming distance, Jaccard index, with a caution below 0.2)"
      const change = page.getByRole('table', { name: 'Change between waves' });
      for (const h of ['Created', 'Dissolved', 'Kept', 'Hamming', 'Jaccard']) await change.getByText(h, { exact: true }).waitFor();
      await page.getByText('Every Jaccard index is at least 0.2').waitFor();
      for (let k = 1; k <= 3; k++) await page.getByTestId(`wave-drawing-${k}`).locator('svg').waitFor();
      await page.getByRole('link', { name: 'Download wave 1 (', exact: false }).waitFor();
      // "A statistician or lead uploads new waves ..." — the lead has the button
      await page.getByRole('button', { name: 'Upload new data' }).click();
      await page.waitForURL(new RegExp(`/studies/${studyId}/data/upload$`));
      await page.getByTestId('choose-files').waitFor();

      // a low Jaccard index: the caution shows in the preview before anything is stored
      await page.getByTestId('file-input').setInputFiles([
        { name: 'one.csv', mimeType: 'text/csv', buffer: Buffer.from(',x,y,z\nx,0,1,0\ny,0,0,1\nz,1,0,0\n') },
        { name: 'two.csv', mimeType: 'text/csv', buffer: Buffer.from(',x,y,z\nx,0,0,1\ny,1,0,0\nz,0,1,0\n') },
      ]);
      await page.getByTestId('upload-preview').waitFor();
      const caution = page.getByText(/Few ties last from wave 1 to wave 2 \(Jaccard index 0\.00, below 0\.2\)/);
      await caution.waitFor();
      await caution.scrollIntoViewIfNeeded();
      // the demo study has no models or batches at start: replacing is announced but needs no tick
      await page.getByTestId('replace-warning').getByText('Storing replaces the data this study holds now.').waitFor();
      await screenshot(page, 'data-caution-preview', 'desktop');

      // pasted CSV text instead of files: the same preview
      await page.getByTestId('remove-all').click();
      for (const text of ['Ari,Bex\nBex,Cato\n', 'Ari,Bex\nCato,Ari\n']) {
        await page.getByRole('button', { name: 'Paste CSV text' }).click();
        await page.getByLabel(/^CSV text of pasted-\d+\.csv$/).last().fill(text);
      }
      await expect.poll(async () => (await page.getByTestId('upload-preview').innerText().catch(() => '')).includes('3 actors, 2 waves, 0 covariates.')).toBe(true);
      await b.close();

      const r = await openBrowser('phone');
      try {
        await r.page.goto(`${server.baseUrl}/sign-in`);
        await signIn(r.page, 'reviewer@harbourside.example', DEMO_PASSWORD);
        await r.page.waitForURL((u) => u.pathname === '/');
        await r.page.goto(`${server.baseUrl}/studies/${studyId}/data`);
        await r.page.getByTestId('waves-table').waitFor();
        expect(await r.page.getByRole('button', { name: 'Upload new data' }).count()).toBe(0);
        await r.page.goto(`${server.baseUrl}/studies/${studyId}/data/upload`);
        await r.page.getByText('Only a lead or statistician of this study can upload data; your role is reviewer.', { exact: false }).waitFor();
        expect(await r.page.getByTestId('file-input').count()).toBe(0);
        await screenshot(r.page, 'data-reviewer', 'phone');
      } finally {
        await r.close();
      }
    } finally {
      await b.close().catch(() => undefined);
    }
  });
});
