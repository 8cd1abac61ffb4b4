// `npm run migrate` / `npm run seed`: database tasks against DATABASE_URL or the private MariaDB.
import { ensureNodeModules, provideDatabase, runTs } from './lib/setup.mjs';

const task = process.argv[2];
ensureNodeModules();
const db = await provideDatabase(process.env.TIDEGAUGE_DB_NAME || 'tidegauge');
try {
  runTs('server/cli.ts', [task === 'seed' ? 'seed-demo' : 'migrate'], { DATABASE_URL: db.url });
} finally {
  if (db.owned) await db.stop();
}
