/**
 * Builds the Express app of the Wavefit API. No listening and no module-level state, so tests can
 * make many apps (each on its own database) in one process. main.ts adds the web app and listens.
 */
import compression from 'compression';
import cookieParser from 'cookie-parser';
import express, { type Express, type RequestHandler } from 'express';
import { createAuth } from './auth/guard';
import { batchesRouter } from './batches/routes';
import { exploreRouter } from './explore/routes';
import { modelsRouter } from './models/routes';
import { notifyRouter } from './notify/routes';
import { reviewRouter } from './review/routes';
import { reportsRouter } from './reports/routes';
import { refitsRouter } from './refits/routes';
import { apiNotFound, errorHandler, type ErrorLogger } from './errors';
import { securityHeaders } from './securityHeaders';
import { authRouter } from './auth/routes';
import { dataRouter } from './data/routes';
import type { AppDeps } from './deps';
import { devRouter } from './dev/routes';
import { healthRouter } from './health/routes';
import { invitationsRouter } from './invitations/routes';
import { lineupsRouter } from './lineups/routes';
import { studiesRouter } from './studies/routes';
import { teamRouter } from './team/routes';

export type { AppDeps } from './deps';

/** Paths (below /api) whose bodies may be large: study data uploads. */
const UPLOAD_PATH = /^\/studies\/[^/]+\/data\/?$/;

export interface CreateAppOptions {
  /** Where unexpected errors are reported (console.error by default). */
  logError?: ErrorLogger;
}

export function createApp(deps: AppDeps, options: CreateAppOptions = {}): Express {
  const { config } = deps;
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.trustProxy);
  // Before every route, so the web app that main.ts adds gets the headers too.
  app.use(securityHeaders(config));
  // gzip or brotli for every compressible answer above 1 kB (the API's JSON and the web app served after it).
  app.use(compression());

  const smallJson = express.json({ limit: config.jsonLimit });
  const uploadJson = express.json({ limit: config.uploadJsonLimit });
  const json: RequestHandler = (req, res, next) =>
    (UPLOAD_PATH.test(req.path) ? uploadJson : smallJson)(req, res, next);

  const api = express.Router();
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    res.set('X-Content-Type-Options', 'nosniff');
    next();
  });
  api.use(cookieParser());

  const auth = createAuth(deps);
  const routeDeps = { ...deps, auth };
  api.use('/health', healthRouter(routeDeps));
  api.use('/auth', authRouter(routeDeps));
  api.use('/invitations', invitationsRouter(routeDeps));
  api.use('/studies', studiesRouter(routeDeps));
  api.use('/studies', teamRouter(routeDeps));
  api.use('/studies', dataRouter(routeDeps));
  api.use('/studies', batchesRouter(routeDeps));
  api.use('/studies', modelsRouter(routeDeps));
  api.use('/studies', refitsRouter(routeDeps));
  api.use('/studies', exploreRouter(routeDeps));
  const review = reviewRouter(routeDeps);
  api.use(review);
  api.use(lineupsRouter(routeDeps));
  api.use(notifyRouter(routeDeps));
  api.use(reportsRouter(routeDeps, review));
  // Only when asked for explicitly (WAVEFIT_DEV_OUTBOX=1, never in production); admins only.
  if (config.devOutbox && !config.isProduction) api.use('/dev', devRouter(routeDeps));
  api.use(apiNotFound);

  app.use('/api', json, api);
  app.use('/api', errorHandler(options.logError));
  return app;
}
