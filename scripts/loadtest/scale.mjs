// `node scripts/loadtest/scale.mjs`: the Catalogue at institutional scale (issue 16). 10 000
// quarterly series, each with a 20-release history of 120 periods (24 M observations when every
// release is stored whole), built by SQL bulk inserts (scripts/loadtest/scale-seed.ts; SCALE_BUILD=http
// loads each release over HTTP as one SDMX-CSV file of 10 000 series instead). The database is built once and kept in
// `tidegauge_scale` (SCALE_RESEED=1 builds it again); then catalogue search and vintage reads are
// driven with autocannon at 32 and 128 connections. Results go to .data/loadtest-scale.json.
// Not part of `npm test`: building the database takes minutes on a small machine.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ensureNodeModules, log, provideDatabase, root, runTs } from '../lib/setup.mjs';
import { startServerUnderLoad } from './server.mjs';

ensureNodeModules();
const { default: autocannon } = await import('autocannon');
const { default: knex } = await import('knex');
const RELEASES = 20;
const PERIODS = 120;
// A database server holding an institution's Catalogue has its cache sized to it: 1.5 GiB here for
// the 0.95 GiB of data (when this run starts the private MariaDB; a running one keeps its setting).
process.env.TIDEGAUGE_DB_BUFFER_POOL ??= '1536M';
// SCALE_SERIES (10 000 by default) tries the whole run on a smaller Catalogue, in a database and
// files of its own.
const SERIES = Number(process.env.SCALE_SERIES || 10_000);
const tag = SERIES === 10_000 ? '' : `-${SERIES}`;
const db = await provideDatabase(`tidegauge_scale${tag.replace('-', '_')}`);
const stateFile = path.join(root, '.data', `loadtest-scale${tag}-state.json`);
const sql = knex({ client: 'mysql2', connection: db.url, pool: { min: 0, max: 2 } });

const vintageCount = async () => {
  try {
    return Number((await sql('vintages').count({ n: '*' }))[0].n);
  } catch {
    return -1;
  }
};
// SCALE_BUILD=sql (the default) writes the releases straight into MariaDB; SCALE_BUILD=http sends
// them to POST /api/v1/loads as one SDMX-CSV file of 10 000 series per release.
const BUILD = process.env.SCALE_BUILD === 'http' ? 'http' : 'sql';
const buildStart = Date.now();
const fresh = process.env.SCALE_RESEED === '1' || !fs.existsSync(stateFile) || (await vintageCount()) < ids0().length * RELEASES;
if (fresh) {
  log(`building the Catalogue at scale (${BUILD === 'sql' ? 'SQL bulk inserts' : 'loads over HTTP'})…`);
  runTs('scripts/loadtest/scale-seed.ts', [stateFile, BUILD, path.join(root, '.data', `scale-releases${tag}`)], { DATABASE_URL: db.url });
}
function ids0() {
  try {
    return JSON.parse(fs.readFileSync(stateFile, 'utf8')).ids ?? [];
  } catch {
    return [];
  }
}
const { token, ids, releases = [] } = JSON.parse(fs.readFileSync(stateFile, 'utf8'));
// A database kept from an earlier run gets the migrations added since (indexes).
runTs('server/cli.ts', ['migrate'], { DATABASE_URL: db.url, MAIL_MODE: 'off' });

const server = await startServerUnderLoad(db, { MAX_UPLOAD_MB: '200' });
const base = server.base;
const stop = async () => {
  await sql.destroy();
  await server.stop();
};
const auth = { Authorization: `Bearer ${token}` };

const have = Math.floor((await vintageCount()) / ids.length);
for (let r = have + 1; r <= RELEASES && releases.length; r++) {
  const t0 = Date.now();
  const form = new FormData();
  form.append('file', new Blob([fs.readFileSync(releases[r - 1].file)]), path.basename(releases[r - 1].file));
  form.append('asOf', releases[r - 1].asOf);
  const res = await fetch(`${base}/api/v1/loads`, { method: 'POST', headers: auth, body: form });
  const body = await res.json();
  if (res.status !== 201) throw new Error(`release ${r}: ${res.status} ${JSON.stringify(body).slice(0, 500)}`);
  log(`release ${r} of ${RELEASES}: ${body.vintages.length} vintages in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
}
// The build's figures are kept with the database, so a later run that reuses it still reports them.
const buildFile = path.join(root, '.data', `loadtest-scale${tag}-build.json`);
if (fresh) fs.writeFileSync(buildFile, JSON.stringify({ how: BUILD, seconds: (Date.now() - buildStart) / 1000, at: new Date().toISOString() }));
const build = fs.existsSync(buildFile) ? JSON.parse(fs.readFileSync(buildFile, 'utf8')) : null;
const [[size]] = await sql.raw('SELECT SUM(data_length + index_length) AS bytes, SUM(table_rows) AS approxRows FROM information_schema.tables WHERE table_schema = DATABASE()');
const observations = Number((await sql('observations').count({ n: '*' }))[0].n);

const DURATION = Number(process.env.LOADTEST_SECONDS || 10);
const pick = () => ids[Math.floor(Math.random() * ids.length)];
const scenarios = {
  // The reference: the same server answering without the Catalogue.
  'health (reference)': () => ({ path: '/api/v1/health' }),
  'catalogue search': () => ({ path: `/api/v1/series?q=SC_0${String(Math.floor(Math.random() * 1000)).padStart(3, '0')}` }),
  'any vintage of any series': () => ({ path: `/api/v1/series/${pick()}/vintages/${1 + Math.floor(Math.random() * RELEASES)}/observations` }),
  // Any date from the first release (2020-04-01) to the end of 2025: the vintage in force then.
  'as-of query': () => ({ path: `/api/v1/series/${pick()}/observations?asOf=${new Date(Date.UTC(2020, 3, 1) + Math.floor(Math.random() * 2100) * 86_400_000).toISOString().slice(0, 10)}` }),
};
// CPU time of the server process (with its worker threads) and of the private MariaDB, from
// /proc: per request it does not depend on what else the machine runs, unlike the latencies.
const dbPid = db.external ? null : Number(fs.readFileSync(path.join(root, '.data', 'mariadb', 'mariadb.pid'), 'utf8'));
const cpuOf = (pid) => {
  try {
    const f = fs.readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ');
    return ((Number(f[11]) + Number(f[12])) * 1000) / 100;
  } catch {
    return 0;
  }
};
const cpuMs = () => ({ server: cpuOf(server.pid), db: dbPid ? cpuOf(dbPid) : 0 });
const built = build ? `; built ${fresh ? 'in this run' : `on ${build.at.slice(0, 10)}`} by ${build.how === 'sql' ? 'SQL bulk inserts' : 'loads over HTTP'} in ${build.seconds.toFixed(0)} s` : '';
const rows = [];
console.log(`\nTidegauge scale load test — ${new Date().toISOString()} — ${os.cpus().length} cores, load average ${os.loadavg()[0].toFixed(1)}, node ${process.version}, ${DURATION} s per run`);
console.log(`${ids.length} series × ${RELEASES} releases × ${PERIODS} periods: ${observations} observations stored, database ${(Number(size.bytes) / 2 ** 30).toFixed(2)} GiB${built}\n`);
for (const c of [32, 128]) {
  for (const [name, setup] of Object.entries(scenarios)) {
    let cpu0 = cpuMs();
    const run = autocannon({ url: base, connections: c, duration: DURATION, headers: auth, timeout: 20, warmup: { connections: c, duration: 2 }, requests: [{ method: 'GET', setupRequest: (req) => ({ ...req, ...setup() }) }] });
    // The CPU count starts with the measured part, after the warm-up.
    const started = setTimeout(() => (cpu0 = cpuMs()), 2000);
    const r = await run;
    clearTimeout(started);
    const requests = r.requests.total || 1;
    const cpu1 = cpuMs();
    const row = { scenario: name, connections: c, rps: r.requests.average, p50: r.latency.p50, p99: r.latency.p99, errors: r.errors + r.timeouts + r.non2xx, serverCpuMs: (cpu1.server - cpu0.server) / requests, dbCpuMs: (cpu1.db - cpu0.db) / requests };
    rows.push(row);
    const ref = rows.find((x) => x.connections === c && x.scenario === 'health (reference)');
    const ratio = ref && ref !== row ? `  p99 ${(row.p99 / Math.max(1, ref.p99)).toFixed(1)}× the reference` : '';
    console.log(`${name.padEnd(28)} ${String(c).padStart(4)}  ${row.rps.toFixed(0).padStart(7)} req/s  p50 ${String(row.p50).padStart(5)} ms  p99 ${String(row.p99).padStart(5)} ms  errors ${row.errors}  CPU per request: server ${row.serverCpuMs.toFixed(2)} ms, database ${row.dbCpuMs.toFixed(2)} ms${ratio}`);
  }
}
// The end of a load test: SIGTERM while 128 connections read vintages. The drain answers or
// refuses (503 shutting_down) every request in flight, and the log shows no failure.
const drainRun = autocannon({ url: base, connections: 128, duration: 30, headers: auth, timeout: 20, requests: [{ method: 'GET', setupRequest: (req) => ({ ...req, ...scenarios['any vintage of any series']() }) }] });
await new Promise((r) => setTimeout(r, 3000));
const drainStart = Date.now();
await server.stopServer();
const drainMs = Date.now() - drainStart;
drainRun.stop();
const drained = await drainRun;
console.log(`\nSIGTERM under 128 connections of vintage reads: drained in ${drainMs} ms; ${drained['2xx']} answered 200, ${drained.non2xx} refused (503), ${drained.errors} connection errors after the listener closed; server log: ${server.failures.length} failures over the whole run`);
for (const line of server.failures.slice(0, 5)) console.log(`  ${line.slice(0, 300)}`);

const find = (s, c) => rows.find((r) => r.scenario === s && r.connections === c);
const targets = [
  ['catalogue search at 32 connections: p99 < 50 ms', find('catalogue search', 32).p99 < 50],
  ['any vintage at 32 connections: p99 < 30 ms', find('any vintage of any series', 32).p99 < 30],
  ['as-of query at 32 connections: p99 < 30 ms', find('as-of query', 32).p99 < 30],
  ['zero errors at 128 connections', rows.filter((r) => r.connections === 128).every((r) => r.errors === 0)],
  ['no failure in the server log, the drain at the end included', server.failures.length === 0],
];
console.log('');
for (const [what, ok] of targets) console.log(`${ok ? 'met   ' : 'MISSED'}  ${what}`);
fs.writeFileSync(path.join(root, '.data', `loadtest-scale${tag}.json`), JSON.stringify({ at: new Date().toISOString(), cores: os.cpus().length, observations, bytes: Number(size.bytes), build, rows, drain: { ms: drainMs, answered: drained['2xx'], refused: drained.non2xx, connectionErrors: drained.errors, logFailures: server.failures.length }, targets }, null, 2));
await stop();
process.exit(targets.every(([, ok]) => ok) ? 0 : 1);
