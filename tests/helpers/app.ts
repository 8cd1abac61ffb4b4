/** Builds the real app on a fresh test database, as the API tests mount it. */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { createApp } from '../../server/app.js';
import { loadConfig, type Config } from '../../server/config.js';
import type { Db } from '../../server/db.js';
import { createLogger } from '../../server/lib/logger.js';
import { startFakeMailServer, type FakeMailServer } from '../../server/mail/fake-smtp.js';
import { createTestDb, type TestDb } from './db.js';

export interface TestApp {
  app: ReturnType<typeof createApp>;
  db: Db;
  testDb: TestDb;
  config: Config;
  mail: FakeMailServer;
  close(): Promise<void>;
}

export function testConfig(overrides: Record<string, string> = {}): Config {
  return loadConfig({ NODE_ENV: 'test', LOG_LEVEL: 'silent', MAIL_MODE: 'off', PUBLIC_ORIGIN: 'http://127.0.0.1:3000', ...overrides });
}

export async function makeTestApp(overrides: Record<string, string> = {}, options: { seedDemo?: boolean } = {}): Promise<TestApp> {
  const testDb = await createTestDb();
  const mail = await startFakeMailServer(0);
  const config = testConfig({ DATABASE_URL: testDb.url, MAIL_MODE: 'fake', FAKE_SMTP_PORT: String(mail.port), ...overrides });
  if (options.seedDemo) {
    const { seedDemo } = await import('../../seeds/demo.js');
    await seedDemo(testDb.db, { onlyIfEmpty: false });
  }
  const app = createApp({ config, db: testDb.db, logger: createLogger(process.env.TEST_LOG_LEVEL ?? 'silent'), mailbox: mail });
  return {
    app,
    db: testDb.db,
    testDb,
    config,
    mail,
    async close() {
      await app.locals.shutdown();
      await mail.close();
      await testDb.drop();
    },
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

export interface TestServer extends TestApp {
  url: string;
  server: Server;
}

/** A real HTTP server on a free port whose PUBLIC_ORIGIN is its own address (links in mails work). */
export async function startServer(overrides: Record<string, string> = {}, options: { seedDemo?: boolean } = {}): Promise<TestServer> {
  const { createServer } = await import('node:http');
  let handler: Parameters<typeof createServer>[1] = (_req, res) => res.end();
  const server = createServer((req, res) => handler!(req, res));
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', () => resolve()));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const t = await makeTestApp({ PUBLIC_ORIGIN: url, ...overrides }, options);
  handler = t.app as never;
  return {
    ...t,
    url,
    server,
    async close() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      server.closeAllConnections?.();
      await t.close();
    },
  };
}
