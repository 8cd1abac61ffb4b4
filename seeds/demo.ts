/**
 * The demo workspace: an invented economy ("the Republic of Estuary") with five people, one for
 * each role, all with the password `tidegauge-demo`, and its series and vintages from
 * datasets/demo/ (made by scripts/make-demo-data.ts). Every number in it is invented.
 */
import type { Db } from '../server/db.js';
import { hashPassword } from '../server/auth/password.js';
import type { Role } from '../server/schemas/people.js';

export const DEMO_PASSWORD = 'tidegauge-demo';
export const DEMO_PEOPLE: { email: string; name: string; roles: Role[] }[] = [
  { email: 'admin@demo.test', name: 'Ada Administrator', roles: ['admin'] },
  { email: 'steward@demo.test', name: 'Sam Steward', roles: ['steward'] },
  { email: 'economist@demo.test', name: 'Erin Economist', roles: ['economist'] },
  { email: 'editor@demo.test', name: 'Eddie Editor', roles: ['editor'] },
  { email: 'viewer@demo.test', name: 'Vera Viewer', roles: ['viewer'] },
];

/** Seeds the demo workspace. Returns false when the database already holds people. */
export async function seedDemo(db: Db, { onlyIfEmpty, work = true }: { onlyIfEmpty: boolean; work?: boolean }): Promise<boolean> {
  if (onlyIfEmpty) {
    const [{ n }] = await db('users').count({ n: '*' });
    if (Number(n) > 0) return false;
  }
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const ids: Record<string, number> = {};
  await db.transaction(async (trx) => {
    for (const p of DEMO_PEOPLE) {
      const [id] = await trx('users').insert({ email: p.email, name: p.name, password_hash: passwordHash });
      ids[p.email] = id;
      await trx('user_roles').insert(p.roles.map((role) => ({ user_id: id, role })));
    }
  });
  const { seedDemoCatalogue } = await import('./demo-catalogue.js');
  await seedDemoCatalogue(db, ids);
  if (work) {
    const { seedDemoWork } = await import('./demo-work.js');
    const { loadConfig } = await import('../server/config.js');
    await seedDemoWork(db, ids, loadConfig(undefined, { MAIL_MODE: 'off' }));
    const { seedDemoChronology } = await import('./demo-chronology.js');
    await seedDemoChronology(db, ids);
    // The demo feed reads the fake SDMX source that `npm start` runs (not in tests: they start their own).
    const config = loadConfig();
    if (config.fakeSdmx.enabled && config.env !== 'test') {
      const { seedDemoFeed } = await import('./demo-feeds.js');
      await seedDemoFeed(db, ids['steward@demo.test'], `http://127.0.0.1:${config.fakeSdmx.port}/rest`);
    }
  }
  return true;
}
