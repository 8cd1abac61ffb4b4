/** The listener: configuration, database, mail, then the app on HOST:PORT. */
import { createApp } from './app.js';
import { ConfigError, loadConfig } from './config.js';
import { createDb } from './db.js';
import { createLogger } from './lib/logger.js';
import { startFakeMailServer, type FakeMailServer } from './mail/fake-smtp.js';

let config;
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
let mailbox: FakeMailServer | undefined;
if (config.mail.mode === 'fake') {
  try {
    mailbox = await startFakeMailServer(config.mail.fakePort);
    logger.info(`fake mail server on 127.0.0.1:${mailbox.port}; messages appear on the Mailbox page`);
  } catch (error) {
    logger.warn({ err: error }, `the fake mail server could not listen on port ${config.mail.fakePort}; set FAKE_SMTP_PORT`);
  }
}
const app = createApp({ config, db, logger, mailbox });

const server = app.listen(config.port, config.host, () => {
  logger.info(`Tidegauge is serving on http://${config.host}:${config.port}`);
  if (process.stdout.isTTY) console.log(`\n  Tidegauge is ready: ${config.publicOrigin}\n`);
});
server.keepAliveTimeout = 65_000;

let closing = false;
async function close(signal: string) {
  if (closing) return;
  closing = true;
  logger.info(`${signal}: closing`);
  // Stop taking connections, let the requests in flight finish (at most 5 s), then close the pool.
  const drained = new Promise<void>((resolve) => server.close(() => resolve()));
  server.closeIdleConnections?.();
  setTimeout(() => process.exit(0), 8000).unref();
  await Promise.race([drained, new Promise((r) => setTimeout(r, 5000))]);
  server.closeAllConnections?.();
  await Promise.allSettled([app.locals.shutdown(), db.destroy(), mailbox?.close()]);
  process.exit(0);
}
process.on('SIGINT', () => void close('SIGINT'));
process.on('SIGTERM', () => void close('SIGTERM'));
