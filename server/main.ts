/** The listener: configuration, database, mail, then the app on HOST:PORT. */
import { createApp } from './app.js';
import { ConfigError, loadConfig } from './config.js';
import { createDb } from './db.js';
import { createLogger } from './lib/logger.js';

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
const app = createApp({ config, db, logger });

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
  server.close();
  server.closeIdleConnections?.();
  setTimeout(() => process.exit(0), 5000).unref();
  await db.destroy().catch(() => {});
  process.exit(0);
}
process.on('SIGINT', () => void close('SIGINT'));
process.on('SIGTERM', () => void close('SIGTERM'));
