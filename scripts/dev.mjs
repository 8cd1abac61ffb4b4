// `npm run dev`: the API with tsx in watch mode on :3000 and the Vite dev server on :5173,
// which proxies /api to it. The private MariaDB and the fake mail server start as for `npm start`.
import { spawn } from 'node:child_process';
import path from 'node:path';
import { ensureNodeModules, log, provideDatabase, root, runTs } from './lib/setup.mjs';

ensureNodeModules();
const db = await provideDatabase(process.env.TIDEGAUGE_DB_NAME || 'tidegauge');
runTs('server/cli.ts', ['migrate', 'seed-demo-if-empty'], { DATABASE_URL: db.url });

const env = { ...process.env, DATABASE_URL: db.url, NODE_ENV: 'development', PUBLIC_ORIGIN: process.env.PUBLIC_ORIGIN || 'http://127.0.0.1:5173' };
const children = [
  spawn(process.execPath, ['--import', 'tsx', '--watch', path.join(root, 'server/main.ts')], { cwd: root, env, stdio: 'inherit' }),
  spawn(path.join(root, 'node_modules/.bin/vite'), [], { cwd: root, env, stdio: 'inherit' }),
];
log('open http://127.0.0.1:5173 (Vite, with the API behind its proxy)');
let stopping = false;
async function stop() {
  if (stopping) return;
  stopping = true;
  for (const c of children) if (c.exitCode === null) c.kill('SIGINT');
  if (db.owned) await db.stop();
  process.exit(0);
}
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
for (const c of children) c.on('exit', stop);
