/**
 * Browser test harness: the real Wavefit server in this process (fresh SQLite file in a temp
 * folder, demo seeded, the outbox mailer, the exported web app from dist/) on a free port, and
 * Debian's chromium driven by playwright-core with a fresh profile per context.
 *
 * Every request the page makes is recorded, so a test can prove that nothing (fonts included)
 * is fetched from any other host.
 */
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import type { DataSource } from 'typeorm';
import { createApp } from '../../server/app';
import { testConfig } from '../../server/config';
import { openDataSource } from '../../server/db/dataSource';
import { seedDemo, type SeedResult } from '../../server/demo/seed';
import { createOutboxMailer, type OutboxMailer } from '../../server/mail/mailer';
import { serveWebApp } from '../../server/main';

export const ROOT = resolve(__dirname, '../..');
export const DIST = join(ROOT, 'dist');
export const SCREENSHOTS = join(__dirname, 'screenshots');
export const CHROMIUM = '/usr/bin/chromium';

export const VIEWPORTS = {
  phone: { width: 390, height: 844 },
  desktop: { width: 1440, height: 900 },
} as const;
export type ViewportName = keyof typeof VIEWPORTS;

export interface WavefitServer {
  baseUrl: string;
  dataSource: DataSource;
  mailer: OutboxMailer;
  seed: SeedResult;
  close(): Promise<void>;
}

/** Fails with a clear message when the exported app or the browser is missing. */
export function assertPrerequisites(dist: string = DIST): void {
  if (!existsSync(join(dist, 'index.html'))) {
    throw new Error(
      `browser tests: the exported web app is missing (${join(dist, 'index.html')}). ` +
        'Build it first with "npx expo export --platform web --output-dir dist" (npm test does this).',
    );
  }
  if (!existsSync(CHROMIUM)) {
    throw new Error(`browser tests: Debian's chromium is missing at ${CHROMIUM} (apt-get install chromium).`);
  }
}

/** distDir: the exported web app to serve (dist/ by default; the web benchmark may point elsewhere). */
export async function startServer(distDir: string = DIST): Promise<WavefitServer> {
  assertPrerequisites(distDir);
  const dir = mkdtempSync(join(tmpdir(), 'wavefit-browser-'));
  const dbPath = join(dir, 'wavefit.sqlite');
  const http: Server = createServer();
  await new Promise<void>((ok, fail) => {
    http.once('error', fail);
    http.listen(0, '127.0.0.1', () => ok());
  });
  const { port } = http.address() as AddressInfo;
  const baseUrl = `http://127.0.0.1:${port}`;
  // A development-like server: the admins' outbox is mounted (as with WAVEFIT_DEV_OUTBOX=1).
  const config = testConfig({ dbPath, publicUrl: baseUrl, distDir, devOutbox: true });
  const dataSource = await openDataSource({ database: dbPath });
  const seed = await seedDemo(dataSource, { passwordHash: config.passwordHash });
  const mailer = createOutboxMailer({ from: config.mailFrom });
  const app = createApp({ dataSource, mailer, config }, { logError: (e) => console.error('[browser-test server]', e) });
  serveWebApp(app, distDir);
  http.on('request', app);
  return {
    baseUrl,
    dataSource,
    mailer,
    seed,
    async close() {
      http.closeAllConnections();
      await new Promise<void>((ok) => http.close(() => ok()));
      if (dataSource.isInitialized) await dataSource.destroy();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  /** Every URL the page requested, in order. */
  requests: string[];
  /** Uncaught page errors and console errors other than failed-resource noise. */
  pageErrors: string[];
  close(): Promise<void>;
}

/** A fresh chromium profile at the given viewport. */
export async function openBrowser(viewport: ViewportName): Promise<BrowserSession> {
  if (!existsSync(CHROMIUM)) throw new Error(`browser tests: Debian's chromium is missing at ${CHROMIUM} (apt-get install chromium).`);
  const profile = mkdtempSync(join(tmpdir(), 'wavefit-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: VIEWPORTS[viewport],
    deviceScaleFactor: 1,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const requests: string[] = [];
  const pageErrors: string[] = [];
  context.on('request', (r) => requests.push(r.url()));
  page.on('pageerror', (e) => pageErrors.push(String(e)));
  page.on('console', (m) => {
    // A 401 from /api/auth/me before sign-in is expected; the browser logs it as a failed resource.
    if (m.type() === 'error' && !/Failed to load resource/.test(m.text())) pageErrors.push(m.text());
  });
  page.setDefaultTimeout(30_000);
  return {
    context,
    page,
    requests,
    pageErrors,
    async close() {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

export async function screenshot(page: Page, name: string, viewport: ViewportName): Promise<string> {
  mkdirSync(SCREENSHOTS, { recursive: true });
  const file = join(SCREENSHOTS, `${name}-${VIEWPORTS[viewport].width}.png`);
  // Let web fonts and images settle so the picture shows the shipped type, not a fallback.
  await page.evaluate(() => document.fonts.ready.then(() => undefined));
  await page.screenshot({ path: file, fullPage: false });
  return file;
}

/** Fills the sign-in form and submits it. */
export async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.getByLabel('E-mail', { exact: true }).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}
