/**
 * Starts Wavefit: migrates the database, serves the API under /api and the exported web app
 * (dist/) for everything else, on one port (PORT, default 4300).
 *
 * Environment: PORT, WAVEFIT_DB, WAVEFIT_SECRET, PUBLIC_URL, SMTP_URL or SMTP_HOST/PORT/USER/PASS,
 * MAIL_FROM, TRUST_PROXY, SECURE_COOKIES, WAVEFIT_DEV_OUTBOX (1: mount the admins' outbox outside production), LOGIN_RATE_LIMIT, LOGIN_RATE_WINDOW_MINUTES, WAVEFIT_DIST,
 * WAVEFIT_SEED_DEMO (1: seed the demo study; 0: never; unset: seed a fresh database outside production).
 */
import { existsSync } from 'node:fs';
import type { Server } from 'node:http';
import { join } from 'node:path';
import express, { type Express } from 'express';
import { createApp } from './app';
import { loadConfig, type Config } from './config';
import { openDataSource } from './db/dataSource';
import { startJobQueue, stopJobQueue } from './jobs';
import { UserEntity } from './auth/entities';
import { describeSeed, seedDemo } from './demo/seed';
import { createMailer } from './mail/mailer';

/** A file name carrying a content hash: the bundler's chunks (entry-<32 hex>.js) and assets (name.<32 hex>.ttf). */
const HASHED_FILE = /[.-][0-9a-f]{32}\.[A-Za-z0-9]{1,8}$/;

/** Cache-Control of a file of the web app: a hashed file never changes, so it is kept for a year; anything else is revalidated. */
export function webCacheControl(path: string): string {
  return HASHED_FILE.test(path) ? 'public, max-age=31536000, immutable' : 'no-cache';
}

/**
 * Adds the exported web app: static files, and index.html for any other page path outside /api (SPA
 * fallback). Hashed files (dist/_expo/static/..., the hashed assets) are immutable for a year;
 * index.html and unhashed files are revalidated on every load. Compression is the app's
 * (createApp mounts the `compression` middleware first).
 */
export function serveWebApp(app: Express, distDir: string): void {
  const indexFile = join(distDir, 'index.html');
  app.use(
    express.static(distDir, {
      index: false,
      cacheControl: false,
      setHeaders: (res, path) => res.setHeader('Cache-Control', webCacheControl(path)),
    }),
  );
  app.use((req, res, next) => {
    if ((req.method !== 'GET' && req.method !== 'HEAD') || req.path === '/api' || req.path.startsWith('/api/')) {
      next();
      return;
    }
    if (/\.[A-Za-z0-9]{1,8}$/.test(req.path)) {
      // A missing file (script, image, font) is a 404, not the app's page.
      res.status(404).type('text/plain').send('Not found.');
      return;
    }
    if (!existsSync(indexFile)) {
      res
        .status(503)
        .type('text/plain')
        .send(`The web app is not built yet: run "npm run build:web" (expected ${indexFile}).`);
      return;
    }
    res.set('Cache-Control', 'no-cache');
    res.sendFile(indexFile);
  });
}

async function shouldSeed(config: Config, countUsers: () => Promise<number>): Promise<boolean> {
  const flag = process.env.WAVEFIT_SEED_DEMO;
  if (flag === '1' || flag === 'true') return true;
  if (flag === '0' || flag === 'false' || config.isProduction) return false;
  return (await countUsers()) === 0;
}

export async function start(config: Config = loadConfig()): Promise<Server> {
  const dataSource = await openDataSource({ database: config.dbPath, postgresUrl: config.postgresUrl ?? undefined });
  if (await shouldSeed(config, () => dataSource.getRepository(UserEntity).count())) {
    // The demo's fits and batches are jobs, which need SQLite for now.
    console.log(describeSeed(await seedDemo(dataSource, { passwordHash: config.passwordHash, withResults: !config.postgresUrl })));
  }
  const mailer = createMailer(config);
  if (mailer.kind === 'outbox') {
    console.log(
      config.isProduction
        ? 'Warning: no SMTP settings (SMTP_URL or SMTP_HOST); e-mails are kept in memory and not delivered.'
        : config.devOutbox
          ? 'Mail: local outbox (GET /api/dev/outbox, site admins only); set SMTP_URL or SMTP_HOST to deliver for real.'
          : 'Mail: kept in memory and not delivered (set WAVEFIT_DEV_OUTBOX=1 to read it at /api/dev/outbox as an admin, or SMTP_URL / SMTP_HOST to deliver).',
    );
  }
  const app = createApp({ dataSource, mailer, config });
  // Resumes simulation batches and fits left unfinished by a stop or a crash. With REDIS_URL the
  // chunks go to `npm run worker` processes through BullMQ (server/jobs/remote/); else worker threads.
  if (config.postgresUrl) console.log('Jobs: not available on PostgreSQL yet (batches, fits and review need SQLite); accounts, studies and data work.');
  else await startJobQueue(dataSource, { log: (line) => console.log(line) });
  console.log(config.redisUrl ? `Jobs: chunks go to remote workers through Redis (${config.redisUrl.replace(/\/\/[^@]*@/, '//***@')}); start them with npm run worker.` : 'Jobs: computed by worker threads of this process.');
  serveWebApp(app, config.distDir);
  const server = app.listen(config.port);
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', reject);
  });
  console.log(`Wavefit ${config.version} is running at http://localhost:${config.port} (database ${config.postgresUrl ? 'PostgreSQL' : config.dbPath})`);
  if (config.publicUrl !== `http://localhost:${config.port}`) console.log(`Public address: ${config.publicUrl}`);

  const shutdown = () => {
    server.close(() => {
      void stopJobQueue(dataSource)
        .then(() => dataSource.destroy())
        .finally(() => process.exit(0));
    });
  };
  process.once('SIGINT', shutdown);
  process.once('SIGTERM', shutdown);
  return server;
}

if (/[\\/]server[\\/]main\.ts$/.test(process.argv[1] ?? '')) {
  start().catch((error) => {
    console.error('Wavefit could not start:', error);
    process.exit(1);
  });
}
