/** Database tasks for the set-up scripts: `migrate`, `seed-demo-if-empty`, `seed-demo`. */
import { loadConfig } from './config.js';
import { createDb, migrateLatest } from './db.js';

const config = loadConfig();
const db = createDb(config.databaseUrl, 4);
try {
  for (const task of process.argv.slice(2)) {
    if (task === 'migrate') {
      const applied = await migrateLatest(db);
      console.log(`[tidegauge] migrations: ${applied.length ? applied.join(', ') : 'up to date'}`);
    } else if (task === 'seed-demo-if-empty' || task === 'seed-demo') {
      if (!config.seedDemo) {
        console.log('[tidegauge] SEED_DEMO=0: no demo workspace');
        continue;
      }
      const { seedDemo } = await import('../seeds/demo.js');
      const done = await seedDemo(db, { onlyIfEmpty: task === 'seed-demo-if-empty' });
      console.log(done ? '[tidegauge] demo workspace seeded (an invented economy)' : '[tidegauge] database already has data: demo not seeded');
    } else {
      throw new Error(`unknown task ${task}`);
    }
  }
} finally {
  await db.destroy();
}
