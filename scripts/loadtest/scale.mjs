// `node scripts/loadtest/scale.mjs`: the Catalogue at institutional scale (issue 16). 10 000
// quarterly series, each with a 20-release history of 120 periods (24 M observations when every
// release is stored whole), loaded release by release over HTTP as one SDMX-CSV file of 10 000
// series each, through the server's own load path. The database is built once and kept in
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
const db = await provideDatabase('tidegauge_scale');
const stateFile = path.join(root, '.data', 'loadtest-scale-state.json');
const sql = knex({ client: 'mysql2', connection: db.url, pool: { min: 0, max: 2 } });

const vintageCount = async () => {
  try {
    return Number((await sql('vintages').count({ n: '*' }))[0].n);
  } catch {
    return -1;
  }
};
if (process.env.SCALE_RESEED === '1' || !fs.existsSync(stateFile) || (await vintageCount()) < 0) {
  log('defining 10 000 series…');
  runTs('scripts/loadtest/scale-seed.ts', [stateFile], { DATABASE_URL: db.url });
}
const { token, ids } = JSON.parse(fs.readFileSync(stateFile, 'utf8'));

const server = await startServerUnderLoad(db, { MAX_UPLOAD_MB: '200' });
const base = server.base;
const stop = async () => {
  await sql.destroy();
  await server.stop();
};
const auth = { Authorization: `Bearer ${token}` };

/** Release r (1…20) of every series: 120 quarters from 1995-Q1, the last eight revised in each release. */
function release(r) {
  const lines = ['STRUCTURE,STRUCTURE_ID,ACTION,FREQ,SERIES_CODE,TIME_PERIOD,OBS_VALUE'];
  for (let s = 0; s < ids.length; s++) {
    const code = `SC_${String(s).padStart(5, '0')}`;
    for (let q = 0; q < PERIODS; q++) {
      const level = 100 + (s % 97) + q * 0.5 + Math.sin(q / 3 + s) * 2;
      const revision = q >= PERIODS - 8 ? r * 0.01 * (q - PERIODS + 9) : 0;
      lines.push(`df,SC:DF(1.0),I,Q,${code},${1995 + Math.floor(q / 4)}-Q${(q % 4) + 1},${(level + revision).toFixed(3)}`);
    }
  }
  return lines.join('\n') + '\n';
}

const have = Math.floor((await vintageCount()) / ids.length);
const loadTimes = [];
for (let r = have + 1; r <= RELEASES; r++) {
  const t0 = Date.now();
  const form = new FormData();
  form.append('file', new Blob([release(r)]), `scale-release-${r}.csv`);
  form.append('asOf', new Date(Date.UTC(2020, 0, 1) + r * 91 * 86_400_000).toISOString().slice(0, 10));
  const res = await fetch(`${base}/api/v1/loads`, { method: 'POST', headers: auth, body: form });
  const body = await res.json();
  if (res.status !== 201) throw new Error(`release ${r}: ${res.status} ${JSON.stringify(body).slice(0, 500)}`);
  loadTimes.push((Date.now() - t0) / 1000);
  log(`release ${r} of ${RELEASES}: ${body.vintages.length} vintages in ${loadTimes.at(-1).toFixed(1)} s`);
}
const [[size]] = await sql.raw('SELECT SUM(data_length + index_length) AS bytes, SUM(table_rows) AS approxRows FROM information_schema.tables WHERE table_schema = DATABASE()');
const observations = Number((await sql('observations').count({ n: '*' }))[0].n);

const DURATION = Number(process.env.LOADTEST_SECONDS || 10);
const pick = () => ids[Math.floor(Math.random() * ids.length)];
const scenarios = {
  // The reference: the same server answering without the Catalogue.
  'health (reference)': () => ({ path: '/api/v1/health' }),
  'catalogue search': () => ({ path: `/api/v1/series?q=SC_0${String(Math.floor(Math.random() * 1000)).padStart(3, '0')}` }),
  'any vintage of any series': () => ({ path: `/api/v1/series/${pick()}/vintages/${1 + Math.floor(Math.random() * RELEASES)}/observations` }),
};
const rows = [];
console.log(`\nTidegauge scale load test — ${new Date().toISOString()} — ${os.cpus().length} cores, node ${process.version}, ${DURATION} s per run`);
console.log(`${ids.length} series × ${RELEASES} releases × ${PERIODS} periods: ${observations} observations stored, database ${(Number(size.bytes) / 2 ** 30).toFixed(2)} GiB${loadTimes.length ? `; releases loaded in ${loadTimes.reduce((a, b) => a + b, 0).toFixed(0)} s (median ${loadTimes.sort((a, b) => a - b)[Math.floor(loadTimes.length / 2)].toFixed(1)} s each)` : ''}\n`);
for (const c of [32, 128]) {
  for (const [name, setup] of Object.entries(scenarios)) {
    const r = await autocannon({ url: base, connections: c, duration: DURATION, headers: auth, timeout: 20, warmup: { connections: c, duration: 2 }, requests: [{ method: 'GET', setupRequest: (req) => ({ ...req, ...setup() }) }] });
    const row = { scenario: name, connections: c, rps: r.requests.average, p50: r.latency.p50, p99: r.latency.p99, errors: r.errors + r.timeouts + r.non2xx };
    rows.push(row);
    const ref = rows.find((x) => x.connections === c && x.scenario === 'health (reference)');
    const ratio = ref && ref !== row ? `  p99 ${(row.p99 / Math.max(1, ref.p99)).toFixed(1)}× the reference` : '';
    console.log(`${name.padEnd(28)} ${String(c).padStart(4)}  ${row.rps.toFixed(0).padStart(7)} req/s  p50 ${String(row.p50).padStart(5)} ms  p99 ${String(row.p99).padStart(5)} ms  errors ${row.errors}${ratio}`);
  }
}
const find = (s, c) => rows.find((r) => r.scenario === s && r.connections === c);
const targets = [
  ['catalogue search at 32 connections: p99 < 50 ms', find('catalogue search', 32).p99 < 50],
  ['any vintage at 32 connections: p99 < 30 ms', find('any vintage of any series', 32).p99 < 30],
  ['zero errors at 128 connections', rows.filter((r) => r.connections === 128).every((r) => r.errors === 0)],
];
console.log('');
for (const [what, ok] of targets) console.log(`${ok ? 'met   ' : 'MISSED'}  ${what}`);
console.log('(the as-of query is measured once it exists: issue 12)');
fs.writeFileSync(path.join(root, '.data', 'loadtest-scale.json'), JSON.stringify({ at: new Date().toISOString(), cores: os.cpus().length, observations, bytes: Number(size.bytes), loadTimes, rows, targets }, null, 2));
await stop();
process.exit(targets.every(([, ok]) => ok) ? 0 : 1);
