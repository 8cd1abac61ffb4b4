/** Each test file gets its own fresh, migrated database on the test MariaDB. */
import { randomBytes } from 'node:crypto';
import knex from 'knex';
import { createDb, migrateLatest, type Db } from '../../server/db.js';

export function testBaseUrl(): URL {
  const raw = process.env.TEST_DATABASE_URL;
  if (!raw) throw new Error('TEST_DATABASE_URL is not set: run the tests with `npm test`.');
  return new URL(raw);
}

export interface TestDb {
  db: Db;
  url: string;
  name: string;
  drop(): Promise<void>;
}

export async function createTestDb(): Promise<TestDb> {
  const base = testBaseUrl();
  const name = `tidegauge_t_${process.pid}_${randomBytes(4).toString('hex')}`;
  const admin = knex({
    client: 'mysql2',
    connection: { host: base.hostname, port: Number(base.port), user: decodeURIComponent(base.username), password: decodeURIComponent(base.password) },
  });
  await admin.raw('CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci', [name]);
  await admin.destroy();
  const url = new URL(base.toString());
  url.pathname = `/${name}`;
  const db = createDb(url.toString(), 10);
  await migrateLatest(db);
  return {
    db,
    url: url.toString(),
    name,
    async drop() {
      await db.raw('DROP DATABASE IF EXISTS ??', [name]).catch(() => {});
      await db.destroy();
    },
  };
}
