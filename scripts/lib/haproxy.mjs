// HAProxy in front of the Galera nodes (scripts/lib/galera.mjs) and of the Tidegauge instances,
// for `npm run cluster` and the cluster tests. Plain Node.js with no dependencies.
import { spawn, execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import { killStale } from './galera.mjs';
import { findClusterPrograms, root } from './setup.mjs';

const exec = promisify(execFile);
const sleep = (ms) => new Promise((r) => setTimeout(r, ms));
const CHECK_SCRIPT = path.join(root, 'scripts', 'cluster', 'galera-check.sh');

/**
 * HAProxy in front of the nodes and the app instances. Each database front end sends its
 * connections to one node and fails over to the others in the given order, as soon as the node's
 * health check (scripts/cluster/galera-check.sh: Synced and ready, not merely listening) fails.
 * @param {{ dir: string, nodes: { port: number, name: string }[], dbFronts: { port: number, order: number[] }[],
 *           apps?: { port: number }[], web?: number, stats: number }} options
 */
export function haproxyConfig({ dir, nodes, dbFronts, apps = [], web, stats }) {
  const db = dbFronts.map(
    (f, k) => `listen db_${k + 1}
  mode tcp
  bind 127.0.0.1:${f.port}
  option external-check
  external-check path "/usr/bin:/bin:/usr/sbin:/sbin"
  external-check command ${CHECK_SCRIPT}
  default-server inter 1s fastinter 500ms downinter 1s fall 2 rise 2 on-marked-down shutdown-sessions
${f.order.map((i, j) => `  server ${nodes[i].name} 127.0.0.1:${nodes[i].port} check${j ? ' backup' : ''}`).join('\n')}
`,
  );
  const front = web
    ? `listen web
  mode http
  bind 127.0.0.1:${web}
  balance roundrobin
  option httpchk GET /api/v1/health
  http-check expect status 200
  option forwardfor
  option redispatch
  # Try another instance when one refuses or goes away (reads only: a write is never sent twice)
  retry-on conn-failure empty-response 503
  http-request disable-l7-retry unless METH_GET || METH_HEAD
  timeout client 10m
  timeout server 10m
  default-server inter 1s fall 2 rise 2
${apps.map((a, k) => `  server app${k + 1} 127.0.0.1:${a.port} check`).join('\n')}
`
    : '';
  return `# Written by scripts/lib/galera.mjs.
global
  maxconn 4096
  pidfile ${path.join(dir, 'haproxy.pid')}
  external-check
  insecure-fork-wanted

defaults
  timeout connect 3s
  timeout client 8h
  timeout server 8h
  timeout check 3s
  retries 2

${db.join('\n')}
${front}
listen stats
  mode http
  bind 127.0.0.1:${stats}
  stats enable
  stats uri /
  stats refresh 5s
`;
}

/** Starts HAProxy with `config`; returns { stop, servers() } where servers() reads the stats page. */
export async function startHaproxy({ dir, config, stats }) {
  const bins = findClusterPrograms();
  const file = path.join(dir, 'haproxy.cfg');
  fs.mkdirSync(dir, { recursive: true });
  fs.chmodSync(CHECK_SCRIPT, 0o755);
  killStale(path.join(dir, 'haproxy.pid'), file);
  fs.writeFileSync(file, config);
  await exec(bins.haproxy, ['-c', '-q', '-f', file]).catch((e) => {
    throw new Error(`HAProxy refused its configuration ${file}:\n${e.stderr || e.message}`);
  });
  const out = fs.openSync(path.join(dir, 'haproxy.log'), 'a');
  const child = spawn(bins.haproxy, ['-db', '-f', file], { detached: true, stdio: ['ignore', out, out] });
  fs.closeSync(out);
  child.unref();
  /** Every proxied server with its state: [{ proxy, server, status }] (status UP, DOWN, …). */
  const servers = async () => {
    const res = await fetch(`http://127.0.0.1:${stats}/;csv`);
    const [header, ...rows] = (await res.text()).trim().split('\n');
    const cols = header.replace(/^# /, '').split(',');
    return rows.map((r) => Object.fromEntries(r.split(',').map((v, k) => [cols[k], v]))).filter((r) => r.svname !== 'FRONTEND' && r.svname !== 'BACKEND').map((r) => ({ proxy: r.pxname, server: r.svname, status: r.status }));
  };
  const until = Date.now() + 15_000;
  while (true) {
    if (child.exitCode !== null) throw new Error(`HAProxy exited with code ${child.exitCode}; see ${path.join(dir, 'haproxy.log')}`);
    if (await servers().then(() => true, () => false)) break;
    if (Date.now() > until) throw new Error('HAProxy did not answer on its stats port within 15 s');
    await sleep(100);
  }
  return {
    pid: child.pid,
    servers,
    /** Waits until `server` of `proxy` has `status` (UP, DOWN). */
    async waitFor(proxy, server, status, timeoutMs = 30_000) {
      const end = Date.now() + timeoutMs;
      while (Date.now() < end) {
        if ((await servers().catch(() => [])).some((s) => s.proxy === proxy && s.server === server && s.status.startsWith(status))) return;
        await sleep(200);
      }
      throw new Error(`HAProxy did not see ${proxy}/${server} ${status} within ${timeoutMs / 1000} s`);
    },
    async stop() {
      if (child.exitCode !== null || child.signalCode !== null) return;
      child.kill('SIGTERM');
      while (child.exitCode === null && child.signalCode === null) await sleep(50);
    },
    kill() {
      if (child.exitCode === null) child.kill('SIGKILL');
    },
  };
}
