/**
 * Runs once before all tests. `npm test` has already started MariaDB and passes TEST_DATABASE_URL;
 * when vitest is run directly, the private MariaDB is started here the same way.
 */
import knex from 'knex';

export default async function setup() {
  let stop: (() => Promise<void>) | undefined;
  if (!process.env.TEST_DATABASE_URL) {
    // @ts-expect-error plain JS module without types
    const setupLib = await import('../../scripts/lib/setup.mjs');
    const db = await setupLib.provideDatabase('tidegauge_test');
    const url = new URL(db.url);
    url.pathname = '/';
    process.env.TEST_DATABASE_URL = url.toString();
    process.env.TIDEGAUGE_DB_DATADIR = setupLib.dbDefaults.dataDir;
    if (db.owned) stop = db.stop;
  }
  process.env.NODE_ENV = 'test';
  return async () => {
    await dropTestDatabases(process.env.TEST_DATABASE_URL!);
    if (stop) await stop();
  };
}

async function dropTestDatabases(baseUrl: string) {
  const url = new URL(baseUrl);
  const db = knex({
    client: 'mysql2',
    connection: { host: url.hostname, port: Number(url.port), user: decodeURIComponent(url.username), password: decodeURIComponent(url.password) },
  });
  try {
    const [rows] = await db.raw("SHOW DATABASES LIKE 'tidegauge\\_t\\_%'");
    for (const row of rows as Array<Record<string, string>>) {
      const name = Object.values(row)[0];
      await db.raw('DROP DATABASE IF EXISTS ??', [name]);
    }
  } catch {
    /* the server may be gone already (fault tests) */
  } finally {
    await db.destroy();
  }
}
