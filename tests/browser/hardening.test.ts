/**
 * Hardening seen through the exported web app in Debian's chromium:
 * - the app renders and loads its four shipped font faces under the server's Content-Security-Policy
 *   and the browser reports no policy violation (securitypolicyviolation events, W3C CSP Level 3);
 * - a session ended elsewhere (sign out everywhere, a password change) sends the other browser back
 *   to sign-in with a plain sentence saying why.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD, DEMO_STUDY_NAME, DEMO_USERS } from '../../server/demo/seed';
import { openBrowser, screenshot, signIn, startServer, type BrowserSession, type WavefitServer } from './harness';

const LEAD = DEMO_USERS.find((u) => u.role === 'lead')!;
const REVIEWER = DEMO_USERS.find((u) => u.role === 'reviewer')!;

let server: WavefitServer;
beforeAll(async () => {
  server = await startServer();
});
afterAll(async () => {
  await server?.close();
});

async function withViolations(b: BrowserSession): Promise<() => Promise<string[]>> {
  await b.context.addInitScript(() => {
    const w = window as unknown as { __csp: string[] };
    w.__csp = [];
    document.addEventListener('securitypolicyviolation', (e) => w.__csp.push(`${e.violatedDirective} ${e.blockedURI}`));
  });
  return () => b.page.evaluate(() => (window as unknown as { __csp: string[] }).__csp);
}

async function signedIn(email: string): Promise<BrowserSession> {
  const b = await openBrowser('desktop');
  await b.page.goto(server.baseUrl + '/');
  await b.page.waitForURL(/\/sign-in/);
  await signIn(b.page, email, DEMO_PASSWORD);
  await b.page.getByRole('link', { name: `Open study ${DEMO_STUDY_NAME}` }).waitFor();
  return b;
}

describe('Content-Security-Policy', () => {
  it('the app renders with its shipped fonts and no violation', async () => {
    const b = await openBrowser('desktop');
    try {
      const violations = await withViolations(b);
      const first = await b.page.goto(server.baseUrl + '/');
      const csp = first!.headers()['content-security-policy'] ?? '';
      expect(csp).toMatch(/frame-ancestors 'none'/);
      expect(csp).toMatch(/script-src 'self'(;|$)/);
      await b.page.waitForURL(/\/sign-in/);
      await signIn(b.page, LEAD.email, DEMO_PASSWORD);
      await b.page.getByRole('link', { name: `Open study ${DEMO_STUDY_NAME}` }).click();
      await b.page.waitForURL(/\/studies\/\d+/);
      await b.page.evaluate(() => document.fonts.ready.then(() => undefined));
      // A face the page does not use yet stays unloaded; loading each one proves the policy lets the file in.
      for (const face of ['Atkinson-Regular', 'Atkinson-Bold', 'PlexMono-Regular', 'PlexMono-Medium']) {
        await b.page.evaluate((f) => document.fonts.load(`16px "${f}"`).then(() => undefined), face);
        expect(await b.page.evaluate((f) => document.fonts.check(`16px "${f}"`), face), face).toBe(true);
      }
      expect(await b.page.evaluate(() => [...document.fonts].filter((f) => f.status === 'error').map((f) => f.family))).toEqual([]);
      const loaded = await b.page.evaluate(() => [...document.fonts].filter((f) => f.status === 'loaded').map((f) => f.family));
      expect(loaded.length).toBeGreaterThan(0);
      await screenshot(b.page, 'csp-study', 'desktop');
      expect(await violations()).toEqual([]);
      expect(b.pageErrors.filter((e) => /Content Security Policy|Refused to/i.test(e))).toEqual([]);
    } finally {
      await b.close();
    }
  });
});

describe('sessions ended elsewhere', () => {
  it('sign out everywhere sends this and the other browser to sign-in, each with a sentence', async () => {
    const here = await signedIn(REVIEWER.email);
    const other = await signedIn(REVIEWER.email);
    try {
      await here.page.getByRole('link', { name: 'Account', exact: true }).click();
      await here.page.getByRole('button', { name: 'Sign out everywhere' }).click();
      await here.page.waitForURL(/\/sign-in/);
      await here.page.getByTestId('session-ended').getByText('You are signed out on every device and browser.').waitFor();
      await screenshot(here.page, 'signed-out-everywhere', 'desktop');

      // The other browser learns it on its next request, without a reload.
      await other.page.getByRole('link', { name: 'Inbox', exact: true }).click();
      await other.page.waitForURL(/\/sign-in/);
      await other.page.getByTestId('session-ended').getByText(/This session has ended/).waitFor();
      await screenshot(other.page, 'session-ended', 'desktop');
      // Signing in again works.
      await signIn(other.page, REVIEWER.email, DEMO_PASSWORD);
      await other.page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
    } finally {
      await here.close();
      await other.close();
    }
  });

  it('a password change keeps this browser signed in and ends the other one', async () => {
    const here = await signedIn(LEAD.email);
    const other = await signedIn(LEAD.email);
    try {
      await here.page.getByRole('link', { name: 'Account', exact: true }).click();
      await here.page.getByLabel('Current password', { exact: true }).fill(DEMO_PASSWORD);
      await here.page.getByLabel('New password', { exact: true }).fill('harbour-tide-2027');
      await here.page.getByLabel('New password again', { exact: true }).fill('harbour-tide-2027');
      await here.page.getByRole('button', { name: 'Change password' }).click();
      await here.page.getByText(/Your password is changed\. Every other session/).waitFor();
      await here.page.getByRole('link', { name: 'Studies', exact: true }).click();
      await here.page.getByRole('link', { name: `Open study ${DEMO_STUDY_NAME}` }).waitFor();

      await other.page.reload();
      await other.page.waitForURL(/\/sign-in/);
      await other.page.getByTestId('session-ended').getByText(/password was changed/).waitFor();
    } finally {
      await here.close();
      await other.close();
    }
  });
});
