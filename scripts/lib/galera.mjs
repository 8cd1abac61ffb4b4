// A MariaDB Galera cluster on loopback, for `npm run cluster` and the cluster tests (HAProxy in
// front of it: haproxy.mjs). Plain Node.js with no dependencies, like setup.mjs. Each node has its
// own folder under `dir` (configuration file, data, socket, log); the settings Galera needs are in
// nodeConfig() below and in README ("Running on a cluster").
import { spawn, execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { createHash } from 'node:crypto';
import { promisify } from 'node:util';
import { findClusterPrograms } from './setup.mjs';

const exec = promisify(execFile);
const sleep = (ms) => new Promise((r) => setTimeout(r, ms));
const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

/** The user HAProxy's health check signs in as (no privileges, no password, from 127.0.0.1 only). */
export const CHECK_USER = 'tidegauge_check';

/**
 * The Unix user mariadbd runs as: never root, because the rsync state transfer to a joining node
 * writes as "nobody" when started by root. Null when not root (then it runs as the current user).
 */
function serverUser() {
  if (!isRoot) return null;
  const line = fs.readFileSync('/etc/passwd', 'utf8').split('\n').find((l) => l.startsWith('mysql:'));
  if (!line) throw new Error('Running as root, the cluster nodes run as the "mysql" user, which does not exist; install mariadb-server (it creates that user).');
  const [, , uid, gid] = line.split(':');
  return { name: 'mysql', uid: Number(uid), gid: Number(gid) };
}

/**
 * Where the node folders live: in `dir`, unless the server user cannot reach it (a checkout under
 * /root, say); then in a folder of /var/tmp, with links to it from `dir`.
 */
function nodesHome(dir, user) {
  if (!user) return dir;
  const blocked = [];
  for (let d = path.dirname(path.resolve(dir)); ; d = path.dirname(d)) {
    const st = fs.existsSync(d) ? fs.statSync(d) : null;
    if (st && st.uid !== user.uid && !(st.mode & 0o001)) blocked.push(d);
    if (d === path.dirname(d)) break;
  }
  if (!blocked.length) return dir;
  const real = path.join('/var/tmp', `tidegauge-cluster-${createHash('sha256').update(path.resolve(dir)).digest('hex').slice(0, 12)}`);
  fs.mkdirSync(real, { recursive: true });
  fs.chmodSync(real, 0o755);
  return real;
}

/** Kills a process left by an earlier run that crashed, if its command line names `marker`. */
export function killStale(pidFile, marker) {
  try {
    const pid = Number(fs.readFileSync(pidFile, 'utf8').trim());
    if (pid > 0 && fs.readFileSync(`/proc/${pid}/cmdline`, 'utf8').includes(marker)) process.kill(pid, 'SIGKILL');
  } catch {
    /* no such process */
  }
}

function readGrastate(datadir) {
  try {
    const text = fs.readFileSync(path.join(datadir, 'grastate.dat'), 'utf8');
    return { seqno: Number(/seqno:\s*(-?\d+)/.exec(text)?.[1] ?? -1), safeToBootstrap: /safe_to_bootstrap:\s*1/.test(text), uuid: /uuid:\s*(\S+)/.exec(text)?.[1] };
  } catch {
    return null;
  }
}

/** Kills what an earlier run left running in `dir` (nodes, HAProxy), then deletes the folder. */
export function resetDir(dir) {
  if (fs.existsSync(dir)) {
    for (const name of fs.readdirSync(dir)) {
      const full = path.join(dir, name);
      if (!/^node\d+$/.test(name)) continue;
      killStale(path.join(full, 'mariadb.pid'), fs.realpathSync(full));
      // A node folder kept outside (see nodesHome) goes too.
      if (fs.lstatSync(full).isSymbolicLink()) {
        const target = fs.realpathSync(full);
        fs.rmSync(target, { recursive: true, force: true });
        if (!fs.readdirSync(path.dirname(target)).length) fs.rmdirSync(path.dirname(target));
      }
    }
    killStale(path.join(dir, 'haproxy.pid'), path.join(dir, 'haproxy.cfg'));
  }
  fs.rmSync(dir, { recursive: true, force: true });
}

export class GaleraCluster {
  /**
   * @param {{ dir: string, nodes: { port: number, gcomm: number, sst: number, ist: number }[], name?: string,
   *           suspectTimeout?: string, quiet?: boolean }} options
   */
  constructor({ dir, nodes, name = 'tidegauge', suspectTimeout = 'PT3S', quiet = false }) {
    this.dir = dir;
    this.name = name;
    this.suspectTimeout = suspectTimeout;
    this.quiet = quiet;
    this.bins = findClusterPrograms();
    this.user = serverUser();
    const where = nodesHome(dir, this.user);
    if (where !== dir) this.log(`the mysql user cannot reach ${dir}: the nodes' folders are in ${where}, linked from ${dir}`);
    this.nodes = nodes.map((ports, i) => {
      const home = path.join(where, `node${i + 1}`);
      return { ...ports, name: `node${i + 1}`, home, datadir: path.join(home, 'data'), socket: path.join(home, 'mariadb.sock'), cnf: path.join(home, 'my.cnf'), logFile: path.join(home, 'mariadb.log'), child: null };
    });
  }

  log(message) {
    if (!this.quiet) process.stdout.write(`[cluster] ${message}\n`);
  }

  nodeConfig(node, user) {
    const peers = this.nodes.map((n) => `127.0.0.1:${n.gcomm}`).join(',');
    const provider = [
      `gmcast.listen_addr=tcp://127.0.0.1:${node.gcomm}`,
      `ist.recv_addr=127.0.0.1:${node.ist}`,
      'gcache.size=128M',
      // How long a silent node has before the others evict it and carry on (Galera's default is PT5S).
      `evs.suspect_timeout=${this.suspectTimeout}`,
    ].join(';');
    return `# Written by scripts/lib/galera.mjs for the node ${node.name} of the cluster "${this.name}".
[mysqld]
${user ? `user=${user.name}\n` : ''}datadir=${node.datadir}
socket=${node.socket}
pid-file=${path.join(node.home, 'mariadb.pid')}
tmpdir=${path.join(node.home, 'tmp')}
log-error=${node.logFile}
port=${node.port}
bind-address=127.0.0.1
skip-name-resolve
character-set-server=utf8mb4
collation-server=utf8mb4_unicode_ci
max-connections=300
max-allowed-packet=64M
innodb-buffer-pool-size=128M
innodb-flush-log-at-trx-commit=1
# What Galera requires
default-storage-engine=InnoDB
binlog-format=ROW
innodb-autoinc-lock-mode=2
# Refuse tables without a primary key and writes to tables Galera does not replicate
wsrep-mode=REQUIRED_PRIMARY_KEY,STRICT_REPLICATION
# The immutability triggers of the migrations are created by the application's user, which has no
# SUPER privilege; with Galera's replication that needs this (else the triggers are skipped)
log-bin-trust-function-creators=1
# Reads wait until this node has applied what the cluster committed before them (read-your-writes
# across nodes: a session made through one node is found through another)
wsrep-sync-wait=1
wsrep-on=ON
wsrep-provider=${this.bins.provider}
wsrep-cluster-name=${this.name}
wsrep-cluster-address=gcomm://${peers}
wsrep-node-name=${node.name}
wsrep-node-address=127.0.0.1:${node.gcomm}
wsrep-node-incoming-address=127.0.0.1:${node.port}
wsrep-provider-options="${provider}"
wsrep-sst-method=rsync
wsrep-sst-receive-address=127.0.0.1:${node.sst}
wsrep-slave-threads=2
`;
  }

  /** Runs SQL as root over the node's socket; returns the rows as arrays of strings. */
  async sql(i, statement) {
    const { stdout } = await exec(this.bins.client, ['--no-defaults', '-S', this.nodes[i].socket, '-u', 'root', '-N', '-B', '-e', statement], { maxBuffer: 64 << 20 });
    return stdout.split('\n').filter(Boolean).map((l) => l.split('\t'));
  }

  /** wsrep status of a node ({} when it does not answer). */
  async status(i) {
    try {
      return Object.fromEntries(await this.sql(i, "SHOW GLOBAL STATUS LIKE 'wsrep\\_%'"));
    } catch {
      return {};
    }
  }

  async #prepare() {
    fs.mkdirSync(this.dir, { recursive: true });
    fs.chmodSync(this.dir, 0o755);
    const user = this.user;
    for (const node of this.nodes) {
      killStale(path.join(node.home, 'mariadb.pid'), node.cnf);
      fs.mkdirSync(path.join(node.home, 'tmp'), { recursive: true });
      const link = path.join(this.dir, node.name);
      if (link !== node.home && !fs.existsSync(link)) fs.symlinkSync(node.home, link);
      fs.writeFileSync(node.cnf, this.nodeConfig(node, user));
      if (user) for (const d of [node.home, path.join(node.home, 'tmp')]) fs.chownSync(d, user.uid, user.gid);
      if (!fs.existsSync(path.join(node.datadir, 'mysql'))) {
        await exec(this.bins.installDb, [`--defaults-file=${node.cnf}`, '--auth-root-authentication-method=normal', '--skip-test-db']).catch((e) => {
          throw new Error(`mariadb-install-db failed for ${node.name}:\n${e.stdout ?? ''}${e.stderr ?? ''}\n${fs.existsSync(node.logFile) ? fs.readFileSync(node.logFile, 'utf8').slice(-2000) : ''}`);
        });
      }
    }
  }

  /** The last committed position (uuid:seqno) of a node that stopped uncleanly, read from its InnoDB. */
  async #recover(node) {
    const out = path.join(node.home, 'recover.log');
    fs.rmSync(out, { force: true });
    await exec(this.bins.mariadbd, [`--defaults-file=${node.cnf}`, '--wsrep-recover', `--log-error=${out}`]).catch(() => {});
    const text = fs.existsSync(out) ? fs.readFileSync(out, 'utf8') : '';
    return /WSREP: Recovered position: (\S+:-?\d+)/.exec(text)?.[1] ?? null;
  }

  /** Starts node i and waits until it is Synced. `bootstrap` starts a new primary component from it. */
  async startNode(i, { bootstrap = false, timeoutMs = 120_000 } = {}) {
    const node = this.nodes[i];
    const args = [`--defaults-file=${node.cnf}`];
    const state = readGrastate(node.datadir);
    if (bootstrap) args.push('--wsrep-new-cluster');
    else if (state && state.seqno < 0 && fs.existsSync(path.join(node.datadir, 'ibdata1'))) {
      // It crashed: start from the position its storage recovered, so it catches up by IST.
      const position = await this.#recover(node);
      if (position) args.push(`--wsrep-start-position=${position}`);
    }
    fs.rmSync(node.socket, { force: true });
    const logStart = fs.existsSync(node.logFile) ? fs.statSync(node.logFile).size : 0;
    const started = Date.now();
    const out = fs.openSync(node.logFile, 'a');
    node.child = spawn(this.bins.mariadbd, args, { detached: true, stdio: ['ignore', out, out] });
    fs.closeSync(out);
    node.child.unref();
    const child = node.child;
    while (true) {
      if (child.exitCode !== null || child.signalCode !== null) throw new Error(`${node.name} exited while starting; see ${node.logFile}:\n${this.tail(i)}`);
      if ((await this.status(i)).wsrep_local_state === '4') break;
      if (Date.now() - started > timeoutMs) throw new Error(`${node.name} was not Synced after ${timeoutMs / 1000} s; see ${node.logFile}:\n${this.tail(i)}`);
      await sleep(300);
    }
    // How it got the data it missed: a full copy (SST), the missed write sets (IST), or none.
    const fresh = fs.readFileSync(node.logFile, 'utf8').slice(logStart);
    const transfer = /SST completed on joiner/.test(fresh) ? 'SST' : /IST received/.test(fresh) ? 'IST' : 'none';
    const ms = Date.now() - started;
    this.log(`${node.name} on 127.0.0.1:${node.port} ${bootstrap ? 'bootstrapped the cluster' : `joined (state transfer: ${transfer})`} in ${(ms / 1000).toFixed(1)} s`);
    return { ms, transfer };
  }

  /** The last lines of a node's log. */
  tail(i, lines = 25) {
    try {
      return fs.readFileSync(this.nodes[i].logFile, 'utf8').trimEnd().split('\n').slice(-lines).join('\n');
    } catch {
      return '(no log)';
    }
  }

  /**
   * Starts every node: a fresh cluster bootstraps from node 1; an existing one from the node that
   * stopped last (safe_to_bootstrap), or, after a crash of all, from the most advanced one.
   */
  async start() {
    if (Object.values(this.bins).some((v) => !v)) throw new Error(`Missing for the cluster: ${Object.entries(this.bins).filter(([, v]) => !v).map(([k]) => k).join(', ')}; run npm run cluster as root once, or install mariadb-server galera-4 rsync haproxy.`);
    for (let i = 0; i < this.nodes.length; i++) {
      if (Object.keys(await this.status(i)).length) throw new Error(`${this.nodes[i].name} of ${this.dir} is already running; stop that cluster first.`);
    }
    await this.#prepare();
    const states = this.nodes.map((n) => readGrastate(n.datadir));
    let first = states.findIndex((s) => s?.safeToBootstrap);
    if (first < 0 && states.some((s) => s && s.uuid && !/^0+-/.test(s.uuid))) {
      // Every node stopped uncleanly: bootstrap from the one with the highest recovered seqno.
      const positions = await Promise.all(this.nodes.map((n) => this.#recover(n)));
      const seqnos = positions.map((p) => Number(p?.split(':').pop() ?? -1));
      first = seqnos.indexOf(Math.max(...seqnos));
      const file = path.join(this.nodes[first].datadir, 'grastate.dat');
      fs.writeFileSync(file, fs.readFileSync(file, 'utf8').replace(/safe_to_bootstrap:\s*0/, 'safe_to_bootstrap: 1'));
      this.log(`no node stopped cleanly; bootstrapping from ${this.nodes[first].name} (seqno ${seqnos[first]}, the highest)`);
    }
    if (first < 0) first = 0;
    await this.startNode(first, { bootstrap: true });
    for (let i = 0; i < this.nodes.length; i++) if (i !== first) await this.startNode(i);
  }

  /** A clean shutdown of node i (it leaves the cluster; the others carry on). */
  async stopNode(i, timeoutMs = 60_000) {
    const node = this.nodes[i];
    await exec(this.bins.admin, ['--no-defaults', '-S', node.socket, '-u', 'root', 'shutdown']).catch(() => {});
    const until = Date.now() + timeoutMs;
    while (node.child && node.child.exitCode === null && node.child.signalCode === null && Date.now() < until) await sleep(100);
    if (node.child && node.child.exitCode === null && node.child.signalCode === null) node.child.kill('SIGKILL');
    node.child = null;
  }

  /** An abrupt failure: SIGKILL, no shutdown. */
  async killNode(i) {
    const child = this.nodes[i].child;
    if (!child) return;
    child.kill('SIGKILL');
    while (child.exitCode === null && child.signalCode === null) await sleep(20);
    this.nodes[i].child = null;
  }

  /** Stops the nodes one after another; the last one stopped is the one to bootstrap from next time. */
  async stop() {
    for (let i = this.nodes.length - 1; i >= 0; i--) if (this.nodes[i].child) await this.stopNode(i);
  }

  /** For exit handlers: SIGKILL whatever is still running, synchronously. */
  killAll() {
    for (const n of this.nodes) if (n.child && n.child.exitCode === null) n.child.kill('SIGKILL');
  }
}
