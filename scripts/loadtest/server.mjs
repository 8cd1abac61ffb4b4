// The server under load, for `npm run loadtest` and scripts/loadtest/scale.mjs: server/main.ts on
// a free loopback port against `db` (from provideDatabase), in production mode, logging failures
// only. Resolves once it answers its health check. stop() drains it, then stops the private MariaDB;
// `failures` holds the error lines of its log.
import { spawn } from 'node:child_process';
import net from 'node:net';
import { root, tsxArgs } from '../lib/setup.mjs';

export async function startServerUnderLoad(db, env = {}) {
  const port = await new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const p = s.address().port;
      s.close(() => resolve(p));
    });
  });
  const base = `http://127.0.0.1:${port}`;
  const server = spawn(process.execPath, tsxArgs('server/main.ts'), {
    cwd: root,
    stdio: ['ignore', 'inherit', 'pipe'],
    // One account drives the whole load: its per-account budget of heavy decompositions is lifted.
    env: { ...process.env, DATABASE_URL: db.url, PORT: String(port), NODE_ENV: 'production', MAIL_MODE: 'off', LOG_LEVEL: 'warn', DB_POOL_MAX: '40', HEAVY_UNITS_PER_MINUTE: '1000000', ...env },
  });
  // The server's log (JSON lines, warnings and errors) passes through, and its failures are counted:
  // a load test's end must leave none (the drain answers or refuses every request in flight).
  const failures = [];
  let pending = '';
  server.stderr.on('data', (chunk) => {
    process.stderr.write(chunk);
    const lines = (pending + chunk.toString()).split('\n');
    pending = lines.pop();
    for (const line of lines) if (/"level":(50|60)/.test(line) || (!line.startsWith('{') && /error|aborted/i.test(line))) failures.push(line);
  });
  /** SIGTERM, then wait for the drain to finish and the process to exit. */
  const stopServer = async () => {
    if (server.exitCode === null) {
      server.kill('SIGTERM');
      await new Promise((r) => server.once('exit', r));
    }
  };
  const stop = async () => {
    await stopServer();
    if (db.owned) await db.stop();
  };
  process.on('SIGINT', async () => {
    await stop();
    process.exit(130);
  });
  for (let i = 0; i < 150; i++) {
    if (await fetch(`${base}/api/v1/health`).then((r) => r.ok, () => false)) break;
    await new Promise((r) => setTimeout(r, 200));
  }
  return { base, stop, stopServer, failures, pid: server.pid };
}
