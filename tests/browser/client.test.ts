/**
 * The exported web app (dist/) in Debian's chromium against the real server and a fresh demo
 * database: sign-in (wrong password and right), the studies table, a study, its team, layout at
 * a phone and a desktop width, and no request to any outside host (fonts are shipped).
 *
 * Expected values come from outside the client: the demo seed (server/demo/seed.ts: users,
 * study name, password) and the API's own answers read through HTTP, never from our screenshots.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD, DEMO_STUDY_NAME, DEMO_USERS } from '../../server/demo/seed';
import { openBrowser, screenshot, signIn, startServer, type ViewportName, type WavefitServer } from './harness';

const LEAD = DEMO_USERS.find((u) => u.role === 'lead')!;
const REVIEWER = DEMO_USERS.find((u) => u.role === 'reviewer')!;
const MEMBERS = DEMO_USERS.filter((u) => u.role !== 'admin');

let server: WavefitServer;

beforeAll(async () => {
  server = await startServer();
});
afterAll(async () => {
  await server?.close();
});

/** Every request stayed on the test server's origin (data: and blob: URLs stay in the page). */
function outsideRequests(requests: string[], baseUrl: string): string[] {
  return requests.filter((u) => !u.startsWith(baseUrl + '/') && !u.startsWith('data:') && !u.startsWith('blob:'));
}

describe.each<ViewportName>(['phone', 'desktop'])('the lead at the %s width', (viewport) => {
  it('is sent to sign-in, is refused a wrong password, then sees the study and its team', async () => {
    expect(LEAD.email).toBe('lead@harbourside.example');
    const b = await openBrowser(viewport);
    try {
      const { page } = b;
      await page.goto(server.baseUrl + '/');
      await page.waitForURL(/\/sign-in/);
      // Each route's code arrives as its own chunk (async routes), so wait for the page to render.
      await page.getByRole('heading', { name: 'Sign in' }).waitFor();
      await expect(page.getByRole('heading', { name: 'Sign in' }).isVisible()).resolves.toBe(true);
      await screenshot(page, 'sign-in', viewport);

      // Keyboard order follows reading order: e-mail, password, then the button.
      await page.getByLabel('E-mail', { exact: true }).focus();
      await page.keyboard.press('Tab');
      expect(await page.evaluate(() => document.activeElement?.getAttribute('aria-label'))).toBe('Password');
      await page.keyboard.press('Tab');
      expect(await page.evaluate(() => document.activeElement?.getAttribute('aria-label'))).toBe('Sign in');

      // Wrong password: the server's message is shown as an alert, no session is started.
      await signIn(page, LEAD.email, 'not-the-password-9');
      const alert = page.getByRole('alert');
      await alert.waitFor();
      expect(await alert.innerText()).toMatch(/Error:.*password/i);
      expect(page.url()).toMatch(/\/sign-in/);
      expect((await b.context.cookies()).filter((c) => c.name === 'wavefit_token')).toHaveLength(0);
      await screenshot(page, 'sign-in-error', viewport);

      // Client-side validation with the shared schema: an empty password never reaches the server.
      await page.getByLabel('Password', { exact: true }).fill('');
      await page.getByRole('button', { name: 'Sign in', exact: true }).click();
      await page.getByText('Enter your password.').waitFor();

      await signIn(page, LEAD.email, DEMO_PASSWORD);
      await page.waitForURL((u) => u.pathname === '/');
      const studyLink = page.getByRole('link', { name: `Open study ${DEMO_STUDY_NAME}` });
      await studyLink.waitFor();
      await expect(page.getByRole('heading', { name: 'Studies', level: 1 }).isVisible()).resolves.toBe(true);
      if (viewport === 'desktop') {
        // A real table with sortable headers; the default sort is by update time, newest first.
        await page.getByRole('table', { name: 'Your studies' }).waitFor();
        expect(await page.getByRole('columnheader', { name: /Updated/ }).getAttribute('aria-sort')).toBe('descending');
      } else {
        // On a phone the table reflows to cards, with a sort picker instead of headers.
        await page.getByRole('list', { name: 'Your studies' }).waitFor();
        expect(await page.getByRole('table').count()).toBe(0);
        await page.getByRole('button', { name: 'Sort by Name' }).waitFor();
      }
      await screenshot(page, 'studies', viewport);

      // Navigation: a bottom tab bar on the phone, a side bar on the desktop.
      const nav = page.getByRole('navigation', { name: 'Main' });
      const box = (await nav.boundingBox())!;
      if (viewport === 'phone') {
        expect(box.y + box.height).toBeCloseTo(844, -1);
        expect(box.width).toBeCloseTo(390, -1);
      } else {
        expect(box.x).toBe(0);
        expect(box.height).toBeCloseTo(900, -1);
        expect(box.width).toBeLessThan(300);
      }

      await studyLink.click();
      await page.waitForURL(/\/studies\/\d+$/);
      const studyId = Number(new URL(page.url()).pathname.split('/')[2]);
      expect(studyId).toBe(server.seed.studyId);
      await page.getByRole('heading', { name: DEMO_STUDY_NAME, level: 1 }).waitFor();
      for (const section of ['Data', 'Models', 'Batches', 'Review board']) {
        await page.getByRole('heading', { name: section, exact: true }).waitFor();
      }
      // Each planned section either says plainly that it is not there yet or (once a later
      // feature fills it) links onward; none is blank.
      for (const key of ['data', 'models', 'batches', 'board']) {
        const card = page.getByTestId(`section-${key}`);
        const placeholder = await card.getByText('Not available yet.').count();
        const links = await card.getByRole('link').count();
        expect(placeholder + links, `section ${key}`).toBeGreaterThan(0);
      }
      await screenshot(page, 'study', viewport);

      await page.getByRole('button', { name: 'Team' }).click();
      await page.waitForURL(/\/studies\/\d+\/team$/);
      const list = page.getByRole('list', { name: 'Members' });
      await list.waitFor();
      for (const m of MEMBERS) await list.getByText(m.name, { exact: false }).first().waitFor();
      expect(await list.getByRole('listitem').count()).toBe(MEMBERS.length);
      // The lead may manage the team.
      await page.getByRole('button', { name: 'Send invitation' }).waitFor();
      await screenshot(page, 'team', viewport);

      // Fonts are shipped: the .ttf files came from our own server and the faces are in use.
      const fontRequests = b.requests.filter((u) => u.endsWith('.ttf'));
      expect(fontRequests.length).toBeGreaterThanOrEqual(2);
      expect(await page.evaluate(() => document.fonts.check('16px "Atkinson-Regular"'))).toBe(true);
      expect(outsideRequests(b.requests, server.baseUrl)).toEqual([]);
      expect(b.pageErrors).toEqual([]);
    } finally {
      await b.close();
    }
  });
});

describe('team and studies at the desktop width', () => {
  it('shows a reviewer the team read-only', async () => {
    const b = await openBrowser('desktop');
    try {
      const { page } = b;
      await page.goto(`${server.baseUrl}/studies/${server.seed.studyId}/team`);
      await page.waitForURL(/\/sign-in/);
      await signIn(page, REVIEWER.email, DEMO_PASSWORD);
      // After sign-in the app returns to the page that was asked for.
      await page.waitForURL(new RegExp(`/studies/${server.seed.studyId}/team$`));
      await page.getByText('Only the study lead can change the team.').waitFor();
      await page.getByRole('list', { name: 'Members' }).waitFor();
      expect(await page.getByRole('button', { name: /Change the role of/ }).count()).toBe(0);
      expect(await page.getByRole('button', { name: 'Send invitation' }).count()).toBe(0);
      await screenshot(page, 'team-reviewer', 'desktop');
    } finally {
      await b.close();
    }
  });

  it('validates a new study with the shared schema, stores nothing on bad input, then creates it', async () => {
    const b = await openBrowser('desktop');
    try {
      const { page } = b;
      await page.goto(`${server.baseUrl}/studies/new`);
      await page.waitForURL(/\/sign-in/);
      await signIn(page, LEAD.email, DEMO_PASSWORD);
      await page.waitForURL(/\/studies\/new$/);
      const before = Number((await server.dataSource.query('SELECT COUNT(*) AS n FROM studies'))[0].n);

      await page.getByLabel('Name', { exact: true }).fill('ab');
      await page.getByRole('button', { name: 'Create study' }).click();
      // The message of createStudyBodySchema in shared/api.ts.
      await page.getByText('A study name needs at least 3 characters.').waitFor();
      expect(page.url()).toMatch(/\/studies\/new$/);
      expect(Number((await server.dataSource.query('SELECT COUNT(*) AS n FROM studies'))[0].n)).toBe(before);

      await page.getByLabel('Name', { exact: true }).fill('Anchorage night watch');
      await page.getByRole('button', { name: 'Create study' }).click();
      await page.waitForURL(/\/studies\/\d+$/);
      await page.getByRole('heading', { name: 'Anchorage night watch', level: 1 }).waitFor();
      expect(Number((await server.dataSource.query('SELECT COUNT(*) AS n FROM studies'))[0].n)).toBe(before + 1);

      // Sorting the studies by name puts them in alphabetical order, and clicking again reverses it.
      await page.getByRole('link', { name: 'Studies', exact: true }).click();
      await page.getByRole('table', { name: 'Your studies' }).waitFor();
      const names = async () => (await page.getByRole('link', { name: /^Open study / }).allInnerTexts()).map((s) => s.trim());
      await page.getByRole('button', { name: 'Sort by Name' }).click();
      const ascending = await names();
      expect(ascending).toEqual([...ascending].sort((a, b) => a.localeCompare(b)));
      expect(ascending).toContain('Anchorage night watch');
      expect(ascending).toContain(DEMO_STUDY_NAME);
      await page.getByRole('button', { name: /Name, sorted ascending/ }).click();
      expect(await names()).toEqual([...ascending].reverse());
    } finally {
      await b.close();
    }
  });

  it('lets an invited person join through the link in the outbox', async () => {
    const b = await openBrowser('phone');
    try {
      const { page } = b;
      await page.goto(`${server.baseUrl}/studies/${server.seed.studyId}/team`);
      await page.waitForURL(/\/sign-in/);
      await signIn(page, LEAD.email, DEMO_PASSWORD);
      await page.waitForURL(/\/team$/);
      const invitee = 'new.crew@harbourside.example';
      await page.getByTestId('invite-email').fill(invitee);
      await page.getByRole('radio', { name: /^Statistician/ }).click();
      await page.getByRole('button', { name: 'Send invitation' }).click();
      await page.getByText(`An invitation is on its way to ${invitee}.`).waitFor();
      await page.getByText(invitee, { exact: true }).waitFor();

      // The invitation e-mail (read from the server's outbox mailer) links to the invitation.
      await page.getByRole('link', { name: 'Account', exact: true }).click();
      await page.getByRole('button', { name: 'Sign out', exact: true }).click();
      await page.waitForURL(/\/sign-in/);
      const mail = server.mailer.messages().find((m) => m.to === invitee);
      const link = /https?:\/\/\S+\/invite\/[A-Za-z0-9_-]+/.exec(mail?.text ?? '')?.[0];
      expect(link, 'invitation link in the e-mail').toBeTruthy();
      await page.goto(link!);
      await page.waitForURL(/\/invite\//);
      await page.getByTestId('invitation-study').getByText(DEMO_STUDY_NAME).waitFor();
      await screenshot(page, 'invitation', 'phone');

      await page.getByLabel('Your name').fill('Rosa Quinlan');
      await page.getByLabel('Choose a password').fill('short');
      await page.getByRole('button', { name: 'Join the study' }).click();
      await page.getByText('A password needs at least 10 characters.').waitFor();
      await page.getByLabel('Choose a password').fill('harbour-lights-42');
      await page.getByRole('button', { name: 'Join the study' }).click();
      await page.waitForURL((u) => u.pathname === '/');
      await page.getByRole('link', { name: `Open study ${DEMO_STUDY_NAME}` }).waitFor();
      await page.getByText('Statistician').first().waitFor();
    } finally {
      await b.close();
    }
  });
});
