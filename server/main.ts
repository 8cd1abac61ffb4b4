/** The listener: configuration, database, mail, then the app on HOST:PORT; a graceful drain on SIGTERM/SIGINT. */
import { createServer } from 'node:http';
import { createApp } from './app.js';
import { ConfigError, loadConfig, type Config } from './config.js';
import { createDb, poolInUse } from './db.js';
import { createDrain } from './lib/drain.js';
import { createLogger } from './lib/logger.js';
import { startLocalMailbox, type FakeMailServer } from './mail/fake-smtp.js';
import { startLocalSdmxSource, type FakeSdmxSource } from './sdmx/fake-source.js';
import { createAnalysisPool } from './workers/pool.js';

let config: Config;
try {
  config = loadConfig();
} catch (error) {
  if (error instanceof ConfigError) {
    console.error(error.message);
    process.exit(1);
  }
  throw error;
}

const logger = createLogger(config.logLevel);
const db = createDb(config.databaseUrl, config.dbPoolMax);
// The fake mail server runs with the app in development and tests only (config refuses it in production).
// Its mail goes to the port it really listens on, never to whatever else may hold FAKE_SMTP_PORT.
let mailbox: FakeMailServer | undefined;
if (config.mail.mode === 'fake') {
  try {
    const started = await startLocalMailbox(config.mail.fakePort);
    mailbox = started.mailbox;
    if (started.moved) {
      const message = `Port ${config.mail.fakePort} (FAKE_SMTP_PORT) is taken by another program, so the fake mail server listens on 127.0.0.1:${mailbox.port} instead and Tidegauge sends its mail there. Set FAKE_SMTP_PORT to choose another port.`;
      logger.warn({ requestedPort: config.mail.fakePort, port: mailbox.port }, message);
      if (process.stdout.isTTY) console.error(`\n  ${message}\n`);
    } else logger.info(`fake mail server on 127.0.0.1:${mailbox.port}; messages appear on the Mailbox page`);
  } catch (error) {
    console.error(`The fake mail server could not start on 127.0.0.1:${config.mail.fakePort} (${(error as Error).message}). Free the port or set FAKE_SMTP_PORT, or set MAIL_MODE=off to run without mail.`);
    process.exit(1);
  }
}
// The local fake SDMX source (development and the demo): a feed reads it through its URL like any source.
let sdmxSource: FakeSdmxSource | undefined;
if (config.fakeSdmx.enabled) {
  try {
    const started = await startLocalSdmxSource(config.fakeSdmx.port);
    sdmxSource = started.source;
    const where = `fake SDMX source (invented data) on ${sdmxSource.url}; POST ${sdmxSource.url}/release publishes a new release`;
    if (started.moved) logger.warn({ requestedPort: config.fakeSdmx.port, port: sdmxSource.port }, `Port ${config.fakeSdmx.port} (FAKE_SDMX_PORT) is taken, so the ${where}`);
    else logger.info(where);
  } catch (error) {
    logger.warn(`The fake SDMX source could not start on 127.0.0.1:${config.fakeSdmx.port} (${(error as Error).message}); set FAKE_SDMX_PORT, or FAKE_SDMX=0.`);
  }
}
const pool = createAnalysisPool(config.workerThreads);
const app = createApp({ config, db, logger, mailbox, pool, feedScheduler: config.feeds.scheduler, alertSweeper: true });

const drain = createDrain();
const server = createServer(drain.listener(app)).listen(config.port, config.host, () => {
  logger.info(`Tidegauge is serving on http://${config.host}:${config.port}`);
  if (process.stdout.isTTY) console.log(`\n  Tidegauge is ready: ${config.publicOrigin}\n`);
});
server.keepAliveTimeout = 65_000;

let closing = false;
async function close(signal: string) {
  if (closing) return;
  closing = true;
  logger.info(`${signal}: closing; new connections are refused, requests in flight are answered`);
  // See server/lib/drain.ts: stop accepting, answer what is in flight, then close the pool.
  const { unfinished, ms } = await drain.shutdown(server, {
    graceMs: config.shutdownGraceMs,
    logger,
    // Work whose client went away still holds or waits for connections, or runs on a worker thread;
    // work done after an answer (a reset mail) is finished too.
    busy: () => poolInUse(db) > 0 || pool.active > 0 || app.locals.background.pending > 0,
    close: () => Promise.allSettled([app.locals.shutdown(), db.destroy(), mailbox?.close(), sdmxSource?.close()]),
  });
  logger.info(`closed after ${ms} ms`);
  process.exit(unfinished ? 1 : 0);
}
process.on('SIGINT', () => void close('SIGINT'));
process.on('SIGTERM', () => void close('SIGTERM'));
