// `npm start`: set everything up on this machine and serve Tidegauge on http://127.0.0.1:3000.
import { spawn } from 'node:child_process';
import {
  ensureClientBuild,
  ensureNodeModules,
  log,
  provideDatabase,
  root,
  runTs,
  tsxArgs,
} from './lib/setup.mjs';

ensureNodeModules();
const db = await provideDatabase(process.env.TIDEGAUGE_DB_NAME || 'tidegauge');
let stopping = false;

async function shutdown(code) {
  if (stopping) return;
  stopping = true;
  if (db.owned) {
    log('stopping the private MariaDB…');
    await db.stop();
  }
  process.exit(code);
}

try {
  runTs('server/cli.ts', ['migrate', 'seed-demo-if-empty'], { DATABASE_URL: db.url });
  ensureClientBuild();
} catch (error) {
  console.error(error);
  await shutdown(1);
}

const env = { ...process.env, DATABASE_URL: db.url, NODE_ENV: process.env.NODE_ENV || 'production' };
if (!env.SMTP_URL && !env.MAIL_MODE) {
  // No mail server configured: keep invitations and resets working on this machine by catching
  // every message in the local fake mail server (admins read them on the Mailbox page).
  env.MAIL_MODE = 'fake';
  log('SMTP_URL is not set: e-mail goes to the local fake mail server (Mailbox page). Set SMTP_URL to send real mail.');
}
if (!env.FAKE_SDMX) {
  // The demo feed reads the local fake SDMX source (invented data), which runs beside the server.
  env.FAKE_SDMX = '1';
  log(`The local fake SDMX source (invented data) runs on http://127.0.0.1:${env.FAKE_SDMX_PORT || 2580}/rest for the demo feed; FAKE_SDMX=0 turns it off.`);
}
const server = spawn(process.execPath, tsxArgs('server/main.ts'), { cwd: root, stdio: 'inherit', env });

// Ctrl-C reaches the server directly (same process group); we wait for it, then stop MariaDB.
for (const signal of ['SIGINT', 'SIGTERM']) {
  process.on(signal, () => {
    if (server.exitCode === null) server.kill(signal);
  });
}
server.on('exit', (code, signal) => {
  void shutdown(signal === 'SIGINT' || signal === 'SIGTERM' ? 0 : (code ?? 0));
});
