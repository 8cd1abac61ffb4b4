/**
 * A fresh load-test database: the database of DATABASE_URL dropped and made again, migrated, with
 * one person (steward and economist, invented) and an API token for the load generator.
 */
import { createDb, migrateLatest, type Db } from '../../server/db.js';
import { hashPassword } from '../../server/auth/password.js';
import { createToken } from '../../server/services/people/tokens.js';

export async function freshLoadTestDb(person: { email: string; name: string }): Promise<{ db: Db; uid: number; token: string }> {
  const url = new URL(process.env.DATABASE_URL!);
  const name = url.pathname.slice(1);
  const server = new URL(url.toString());
  server.pathname = '/';
  const admin = createDb(server.toString(), 2);
  await admin.raw('DROP DATABASE IF EXISTS ??', [name]);
  await admin.raw('CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci', [name]);
  await admin.destroy();
  const db = createDb(url.toString(), 4);
  await migrateLatest(db);
  const [uid] = await db('users').insert({ email: person.email, name: person.name, password_hash: await hashPassword(`${person.email}-password`) });
  await db('user_roles').insert([
    { user_id: uid, role: 'economist' },
    { user_id: uid, role: 'steward' },
  ]);
  const token = (await createToken(db, uid, 'loadtest')).token;
  return { db, uid, token };
}
