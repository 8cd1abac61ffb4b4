/** Builds the real app on a fresh test database, as the API tests mount it. */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { createApp } from '../../server/app.js';
import { loadConfig, type Config } from '../../server/config.js';
import type { Db } from '../../server/db.js';
import { createLogger } from '../../server/lib/logger.js';
import { createTestDb, type TestDb } from './db.js';

export interface TestApp {
  app: ReturnType<typeof createApp>;
  db: Db;
  testDb: TestDb;
  config: Config;
  close(): Promise<void>;
}

export function testConfig(overrides: Record<string, string> = {}): Config {
  return loadConfig({ NODE_ENV: 'test', LOG_LEVEL: 'silent', MAIL_MODE: 'off', PUBLIC_ORIGIN: 'http://127.0.0.1:3000', ...overrides });
}

export async function makeTestApp(overrides: Record<string, string> = {}): Promise<TestApp> {
  const testDb = await createTestDb();
  const config = testConfig({ DATABASE_URL: testDb.url, ...overrides });
  const app = createApp({ config, db: testDb.db, logger: createLogger('silent') });
  return {
    app,
    db: testDb.db,
    testDb,
    config,
    close: () => testDb.drop(),
  };
}

/** Listens on a free loopback port; returns the base URL. */
export async function listen(app: ReturnType<typeof createApp>): Promise<{ server: Server; url: string }> {
  const server = await new Promise<Server>((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  const { port } = server.address() as AddressInfo;
  return { server, url: `http://127.0.0.1:${port}` };
}
