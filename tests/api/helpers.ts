/**
 * Test helpers: a fresh app on a fresh database (in memory unless a file is asked for), the demo
 * users seeded, the fake outbox mailer, and sign-in shortcuts.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import type { DataSource } from 'typeorm';
import { createApp } from '../../server/app';
import { testConfig, type Config } from '../../server/config';
import { openDataSource } from '../../server/db/dataSource';
import { DEMO_PASSWORD, seedDemo, type SeedResult } from '../../server/demo/seed';
import { createOutboxMailer, type OutboxMailer } from '../../server/mail/mailer';

export interface TestApp {
  app: ReturnType<typeof createApp>;
  dataSource: DataSource;
  mailer: OutboxMailer;
  config: Config;
  seed: SeedResult;
  /** Errors the app logged as unexpected (500s). */
  loggedErrors: unknown[];
  /** Signs in and returns the bearer token. */
  tokenFor(email: string, password?: string): Promise<string>;
  /** Row counts of the given tables. */
  counts(...tables: string[]): Promise<Record<string, number>>;
  close(): Promise<void>;
}

export const LEAD = 'lead@harbourside.example';
export const STATS = 'stats@harbourside.example';
export const REVIEWER = 'reviewer@harbourside.example';
export const ADMIN = 'admin@harbourside.example';

export async function makeTestApp(options: { file?: boolean; config?: Partial<Config> } = {}): Promise<TestApp> {
  const dir = options.file ? mkdtempSync(join(tmpdir(), 'wavefit-test-')) : null;
  const database = dir ? join(dir, 'test.sqlite') : ':memory:';
  const config = testConfig({ dbPath: database, ...options.config });
  const dataSource = await openDataSource({ database });
  const mailer = createOutboxMailer({ from: config.mailFrom });
  const loggedErrors: unknown[] = [];
  const app = createApp({ dataSource, mailer, config }, { logError: (error) => loggedErrors.push(error) });
  const seed = await seedDemo(dataSource, { passwordHash: config.passwordHash });
  return {
    app,
    dataSource,
    mailer,
    config,
    seed,
    loggedErrors,
    async tokenFor(email, password = DEMO_PASSWORD) {
      const res = await request(app).post('/api/auth/login').send({ email, password });
      if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
      return res.body.token as string;
    },
    async counts(...tables) {
      const result: Record<string, number> = {};
      for (const table of tables) {
        const [row] = await dataSource.query(`SELECT COUNT(*) AS n FROM "${table}"`);
        result[table] = Number(row.n);
      }
      return result;
    },
    async close() {
      if (dataSource.isInitialized) await dataSource.destroy();
      if (dir) rmSync(dir, { recursive: true, force: true });
    },
  };
}

export const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });
