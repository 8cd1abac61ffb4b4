/**
 * What the routes and services are given: configuration, database, logger, mail and the worker
 * pool. Its own module so that the app factory and the route modules both import it without
 * importing each other.
 */
import type { Config } from './config.js';
import type { Db } from './db.js';
import type { Logger } from './lib/logger.js';
import type { AppLucia } from './auth/lucia.js';
import type { Mailer } from './mail/mailer.js';
import type { FakeMailServer } from './mail/fake-smtp.js';
import type { AnalysisPool } from './workers/pool.js';
import type { Background } from './lib/background.js';

export interface AppOptions {
  config: Config;
  db: Db;
  logger: Logger;
  /** Outgoing mail; made from the configuration when not given. */
  mailer?: Mailer;
  /** The local fake mail server, when one runs (development and tests): feeds the Mailbox page. */
  mailbox?: FakeMailServer;
  /** Worker threads for large batches; made from the configuration when not given. */
  pool?: AnalysisPool;
  /** Start the feeds' scheduler with the app (the server does; tests tick it themselves). */
  feedScheduler?: boolean;
  /** Sweep unfinished release alerts at start and every minute (the server does; tests sweep themselves). */
  alertSweeper?: boolean;
}

export interface AppDeps extends AppOptions {
  mailer: Mailer;
  lucia: AppLucia;
  pool: AnalysisPool;
  /** Work done after the answer is sent (lib/background.ts). */
  background: Background;
}
