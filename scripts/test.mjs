// `npm test`: the same set-up as `npm start` (packages, MariaDB, Chromium, client build), then
// every test: unit, API (against the real MariaDB), browser (Debian's Chromium) and, last, the
// Galera cluster (Debian's galera-4 and HAProxy).
import { spawn } from 'node:child_process';
import path from 'node:path';
import {
  dbDefaults,
  ensureChromium,
  ensureClientBuild,
  ensureClusterPackages,
  ensureMariadbInstalled,
  ensureNodeModules,
  ensurePrintTools,
  ensureSdmxClient,
  ensureStatsmodels,
  log,
  provideDatabase,
  root,
} from './lib/setup.mjs';

ensureNodeModules();
const bins = ensureMariadbInstalled();
const chromium = ensureChromium();
ensureClusterPackages();
ensurePrintTools();
ensureSdmxClient();
ensureStatsmodels();
// The tests make their own databases (tidegauge_test_…) on this server; the demo database is
// never touched.
const db = await provideDatabase('tidegauge_test');
ensureClientBuild();

const base = new URL(db.url);
base.pathname = '/';
const env = {
  ...process.env,
  NODE_ENV: 'test',
  TEST_DATABASE_URL: base.toString(),
  TIDEGAUGE_MARIADBD: bins.mariadbd,
  TIDEGAUGE_MARIADB_INSTALL_DB: bins.installDb,
  TIDEGAUGE_MARIADB_ADMIN: bins.admin,
  CHROMIUM_PATH: chromium,
  TIDEGAUGE_DB_DATADIR: dbDefaults.dataDir,
};
delete env.DATABASE_URL;

log('running the tests (vitest)…');
const vitest = spawn(path.join(root, 'node_modules', '.bin', 'vitest'), ['run', ...process.argv.slice(2)], {
  cwd: root,
  env,
  stdio: 'inherit',
});
for (const signal of ['SIGINT', 'SIGTERM']) process.on(signal, () => vitest.kill(signal));
vitest.on('exit', async (code, signal) => {
  if (db.owned) await db.stop();
  process.exit(code ?? (signal ? 1 : 0));
});
