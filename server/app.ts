/**
 * The Express application factory. It holds no state of its own: everything lives in the
 * database, so several instances can serve behind a load balancer. Tests mount it directly.
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import express, { type Express, type RequestHandler } from 'express';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import type { AppDeps, AppOptions } from './deps.js';
import { createBackground } from './lib/background.js';
import { errorHandler } from './lib/error-answer.js';
import { HttpError } from './lib/errors.js';
import { duringShutdown } from './lib/drain.js';
import { mount, type RegisteredRoute, type RouteSpec } from './lib/http.js';
import { redactUrl, type Logger } from './lib/logger.js';
import { createLucia } from './auth/lucia.js';
import { authenticate, originCheck } from './auth/middleware.js';
import { TokenMemory } from './auth/token-memory.js';
import { createMailer } from './mail/mailer.js';
import { authRoutes } from './routes/auth.js';
import { healthRoutes } from './routes/health.js';
import { openapiRoutes } from './routes/openapi.js';
import { peopleRoutes } from './routes/people.js';
import { catalogueRoutes } from './routes/catalogue.js';
import { decomposeRoutes } from './routes/decompose.js';
import { analysisRoutes } from './routes/analyses.js';
import { studyRoutes } from './routes/studies.js';
import { boardRoutes } from './routes/boards.js';
import { exhibitRoutes } from './routes/exhibits.js';
import { chronologyRoutes } from './routes/chronology.js';
import { printRoutes } from './routes/print.js';
import { feedRoutes } from './routes/feeds.js';
import { sdmxRoutes } from './routes/sdmx.js';
import { startFeedScheduler } from './services/feeds/scheduler.js';
import { alertRoutes } from './routes/alerts.js';
import { startAlertSweeper } from './services/alerts/outbox.js';
import { closePrintPool } from './workers/print-pool.js';
import { configureObservationCache } from './services/catalogue/stored-values.js';
import { createAnalysisPool } from './workers/pool.js';

export type { AppDeps, AppOptions };

export const API_PREFIX = '/api/v1';
const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

/** What the app keeps for its host and tests: the route table, shutdown, and work after the answer. */
export interface AppLocals {
  routes: RegisteredRoute[];
  shutdown: () => Promise<void>;
  background: AppDeps['background'];
}

export function createApp(options: AppOptions): Express & { locals: AppLocals } {
  const { config, logger, db } = options;
  const deps: AppDeps = {
    ...options,
    mailer: options.mailer ?? createMailer(config, logger, options.mailbox?.port),
    lucia: createLucia(db, config.sessionIdleHours, config.publicOrigin.startsWith('https://')),
    pool: options.pool ?? createAnalysisPool(config.workerThreads),
    background: createBackground(logger),
  };
  configureObservationCache(config.observationCacheValues);
  const app = express();
  app.disable('x-powered-by');
  // API answers are computed per request; hashing every body for an ETag would only cost time.
  app.set('etag', false);
  app.set('trust proxy', config.trustProxy);
  app.set('query parser', 'simple');

  app.use(
    securityHeaders(
      helmet({
        contentSecurityPolicy: {
          useDefaults: false,
          directives: {
            defaultSrc: ["'self'"],
            scriptSrc: ["'self'"],
            // ECharts and the table layout set element styles; no inline <style> or script is needed.
            styleSrc: ["'self'", "'unsafe-inline'"],
            imgSrc: ["'self'", 'data:', 'blob:'],
            fontSrc: ["'self'"],
            connectSrc: ["'self'"],
            objectSrc: ["'none'"],
            baseUri: ["'self'"],
            formAction: ["'self'"],
            frameAncestors: ["'none'"],
            workerSrc: ["'self'", 'blob:'],
          },
        },
        crossOriginEmbedderPolicy: false,
        strictTransportSecurity: config.publicOrigin.startsWith('https://'),
      }),
    ),
  );
  if (['info', 'debug', 'trace'].includes(config.logLevel)) {
    app.use(
      pinoHttp({
        logger,
        autoLogging: { ignore: (req) => req.url === '/api/v1/health' },
        serializers: {
          // Invitation and reset links carry their secret in the path: never logged.
          req: (req) => ({ id: req.id, method: req.method, url: redactUrl(req.url) }),
          res: (res) => ({ statusCode: res.statusCode }),
        },
        // A 503 while the server drains is expected, not a failure.
        customLogLevel: (req, res, err) => ((err || res.statusCode >= 500) && !(res.statusCode === 503 && duringShutdown(req)) ? 'error' : res.statusCode >= 400 ? 'warn' : 'info'),
      }),
    );
  } else {
    // Quieter levels log only failures (from the error handler): no per-request logger.
    app.use((req, _res, next) => {
      (req as { log?: Logger }).log = logger;
      next();
    });
  }

  const routes: RegisteredRoute[] = [];
  const api = express.Router();
  api.use(express.json({ limit: config.maxJsonBytes, strict: true }));
  api.use(authenticate(db, deps.lucia, new TokenMemory(config.tokenRecheckMs)));
  api.use(originCheck(config));

  const groups: RouteSpec[][] = [healthRoutes(deps), openapiRoutes(() => routes, config), authRoutes(deps), peopleRoutes(deps), catalogueRoutes(deps), decomposeRoutes(deps), analysisRoutes(deps), studyRoutes(deps), boardRoutes(deps), exhibitRoutes(deps), printRoutes(deps), chronologyRoutes(deps), alertRoutes(deps), feedRoutes(deps), sdmxRoutes(deps)];
  for (const specs of groups) mount(api, API_PREFIX, specs, routes);

  api.use((req, _res, next) => next(new HttpError(404, 'not_found', `There is no API route ${req.method} ${req.baseUrl}${req.path}.`)));
  app.use(API_PREFIX, api);
  app.use('/api', (req, _res, next) => next(new HttpError(404, 'not_found', `There is no API route ${req.method} ${req.originalUrl}; the API lives under ${API_PREFIX}.`)));

  const staticDir = config.staticDir ?? path.join(root, 'dist', 'client');
  if (fs.existsSync(path.join(staticDir, 'index.html'))) {
    app.use('/assets', express.static(path.join(staticDir, 'assets'), { immutable: true, maxAge: '1y' }));
    // A missing asset is a 404 (an old page asking for a file of an earlier build), not an error to log.
    app.use('/assets', (_req, res) => void res.status(404).type('text/plain').send('Not found.'));
    app.use(express.static(staticDir, { index: false, maxAge: '1h' }));
    const indexHtml = path.join(staticDir, 'index.html');
    app.use((req, res, next) => {
      if (req.method !== 'GET' && req.method !== 'HEAD') return next();
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(indexHtml);
    });
  }

  app.use(errorHandler(logger, config));
  app.locals.routes = routes;
  // Feeds' schedules: every instance may tick; a lease in the database lets one run each time.
  const scheduler = options.feedScheduler ? startFeedScheduler(deps) : null;
  // Release alerts a stopped server left unsent (services/alerts/outbox.ts).
  const sweeper = options.alertSweeper ? startAlertSweeper(deps) : null;
  app.locals.shutdown = async () => {
    await scheduler?.stop();
    await sweeper?.stop();
    await deps.background.idle();
    await deps.pool.close();
    await closePrintPool();
  };
  app.locals.background = deps.background;
  return app as Express & { locals: AppLocals };
}

/**
 * helmet's headers are the same for every answer: compute them once from helmet itself and set
 * them in one step, instead of running its dozen middlewares per request.
 */
function securityHeaders(middleware: RequestHandler): RequestHandler {
  const headers: Record<string, string> = {};
  const fake = {
    setHeader: (k: string, v: string) => void (headers[k] = String(v)),
    removeHeader: (k: string) => void delete headers[k],
    getHeader: (k: string) => headers[k],
  };
  middleware({ headers: {}, method: 'GET', url: '/', secure: false } as never, fake as never, () => {});
  return (_req, res, next) => {
    res.setHeaders(new Map(Object.entries(headers)));
    next();
  };
}
