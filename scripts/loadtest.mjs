// `npm run loadtest`: the product against its own database, driven from this (second) process
// with autocannon on loopback, bounded in time. Prints requests per second, p50/p99 latency and
// errors per scenario and connection count, with /api/v1/health as the reference, and checks the
// targets of the reliability issue. Results are also written to .data/loadtest-results.json.
// Then the Catalogue at institutional scale (scripts/loadtest/scale.mjs, issue 16). `npm run
// loadtest -- main` runs only the first part, `npm run loadtest -- scale` only the second.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ensureNodeModules, log, provideDatabase, root, runTs } from './lib/setup.mjs';
import { startServerUnderLoad } from './loadtest/server.mjs';

ensureNodeModules();
const part = process.argv[2];
/** The scale part, in a process of its own (it starts the private MariaDB with a larger cache). */
const scale = () => spawnSync(process.execPath, [path.join(root, 'scripts', 'loadtest', 'scale.mjs')], { stdio: 'inherit', env: process.env }).status ?? 1;
if (part === 'scale') process.exit(scale());
const { default: autocannon } = await import('autocannon');
const db = await provideDatabase('tidegauge_loadtest');
const stateFile = path.join(root, '.data', 'loadtest-state.json');
log('seeding 10 000 series × 200 quarters…');
runTs('scripts/loadtest/seed.ts', [stateFile], { DATABASE_URL: db.url });
const { token, ids } = JSON.parse(fs.readFileSync(stateFile, 'utf8'));

const { base, stop } = await startServerUnderLoad(db);

const headers = { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' };
const pick = () => ids[Math.floor(Math.random() * ids.length)];
const DURATION = Number(process.env.LOADTEST_SECONDS || 10);
const one = ids[0];

const scenarios = {
  health: { method: 'GET', path: '/api/v1/health' },
  'catalogue search': { method: 'GET', setup: () => ({ path: `/api/v1/series?q=LT_0${String(Math.floor(Math.random() * 100)).padStart(2, '0')}` }) },
  observations: { method: 'GET', setup: () => ({ path: `/api/v1/series/${pick()}/vintages/latest/observations` }) },
  'decompose stored (200 q)': { method: 'POST', path: '/api/v1/decompose/batch', body: JSON.stringify({ items: [{ seriesId: one, method: 'hp' }] }) },
  'decompose, any of 10 000': { method: 'POST', setup: () => ({ path: '/api/v1/decompose/batch', body: JSON.stringify({ items: [{ seriesId: pick(), method: 'hp' }] }) }) },
  'batch of 50 stored': { method: 'POST', setup: () => ({ path: '/api/v1/decompose/batch', body: JSON.stringify({ output: 'summary', items: Array.from({ length: 50 }, () => ({ seriesId: pick(), method: 'hp' })) }) }) },
};

function options(name, connections, duration) {
  const s = scenarios[name];
  return {
    url: base,
    connections,
    duration,
    headers,
    timeout: 20,
    // Connections are opened and the server warmed before measuring.
    warmup: { connections, duration: 2 },
    requests: [{ method: s.method, path: s.path ?? '/', body: s.body, setupRequest: (req) => (s.setup ? { ...req, ...s.setup() } : req) }],
  };
}

const run = (name, connections, duration = DURATION) => autocannon(options(name, connections, duration));

const rows = [];
const fmt = (r, name, c, note = '') => {
  const row = { scenario: name, connections: c, rps: r.requests.average, p50: r.latency.p50, p99: r.latency.p99, errors: r.errors + r.timeouts + r.non2xx, note };
  rows.push(row);
  console.log(`${name.padEnd(28)} ${String(c).padStart(4)}  ${row.rps.toFixed(0).padStart(7)} req/s  p50 ${String(row.p50).padStart(5)} ms  p99 ${String(row.p99).padStart(5)} ms  errors ${row.errors}${note ? '  ' + note : ''}`);
  return row;
};

console.log(`\nTidegauge load test — ${new Date().toISOString()} — ${os.cpus().length} cores (${os.cpus()[0]?.model ?? ''}), node ${process.version}, ${DURATION} s per run\n`);
for (const c of [8, 32, 128]) {
  for (const name of Object.keys(scenarios)) fmt(await run(name, c), name, c);
}

// Health at 128 connections while a batch of 10 000 stored series runs.
log('batch of 10 000 series, with 128 connections of reads and a health probe meanwhile…');
await new Promise((r) => setTimeout(r, 1000));
const t0 = Date.now() + 2500;
const batch = new Promise((r) => setTimeout(r, 2500)).then(() => fetch(`${base}/api/v1/decompose/batch`, { method: 'POST', headers, body: JSON.stringify({ output: 'summary', items: ids.map((id) => ({ seriesId: id, method: 'hp' })) }) }).then(async (r) => {
  const body = await r.json();
  return { status: r.status, items: body.items?.length ?? 0, errors: (body.items ?? []).filter((i) => i.error).length, seconds: (Date.now() - t0) / 1000 };
}));
// While the batch runs: 128 connections of catalogue reads, and a health probe every 50 ms on a
// connection of its own, as a load balancer would send.
const readRun = autocannon(options('observations', 128, 120));
const readDone = new Promise((resolve) => readRun.on('done', resolve));
const probes = [];
let probing = true;
const prober = (async () => {
  await new Promise((r) => setTimeout(r, 2500));
  while (probing) {
    const t = performance.now();
    const r = await fetch(`${base}/api/v1/health`);
    await r.arrayBuffer();
    probes.push({ ms: performance.now() - t, ok: r.status === 200 });
    await new Promise((r2) => setTimeout(r2, 50));
  }
})();
const b = await batch;
probing = false;
await prober;
readRun.stop();
const during = await readDone;
fmt(during, 'reads during 10 000 batch', 128, `(batch: ${b.status}, ${b.items} items, ${b.errors} item errors, ${b.seconds.toFixed(1)} s)`);
const sorted = probes.map((p) => p.ms).sort((x, y) => x - y);
const q = (f) => sorted[Math.min(sorted.length - 1, Math.floor(f * sorted.length))];
const probeErrors = probes.filter((p) => !p.ok).length;
const worstP99 = q(0.99);
console.log(`${'health probe during batch'.padEnd(28)} ${'1'.padStart(4)}  ${String(probes.length).padStart(7)} probes  p50 ${q(0.5).toFixed(0).padStart(5)} ms  p99 ${worstP99.toFixed(0).padStart(5)} ms  max ${sorted[sorted.length - 1].toFixed(0)} ms  errors ${probeErrors}`);
rows.push({ scenario: 'health probe during batch', connections: 1, rps: probes.length / b.seconds, p50: q(0.5), p99: worstP99, max: sorted[sorted.length - 1], errors: probeErrors });

const find = (s, c) => rows.find((r) => r.scenario === s && r.connections === c);
const targets = [
  ['decompose stored at 32 connections: p99 < 50 ms', find('decompose stored (200 q)', 32).p99 < 50],
  ['decompose stored at 32 connections: zero errors', find('decompose stored (200 q)', 32).errors === 0],
  ['every scenario at 128 connections: zero errors', rows.filter((r) => r.connections === 128).every((r) => r.errors === 0)],
  ['health probe during the 10 000-series batch (and 128 connections of reads): p99 < 200 ms, no errors', worstP99 < 200 && probeErrors === 0],
  ['reads at 128 connections during the batch: zero errors', rows.find((r) => r.scenario === 'reads during 10 000 batch').errors === 0],
  ['the 10 000-series batch answered in full', b.status === 200 && b.items === 10000 && b.errors === 0],
];
console.log('');
for (const [what, ok] of targets) console.log(`${ok ? 'met   ' : 'MISSED'}  ${what}`);
fs.writeFileSync(path.join(root, '.data', 'loadtest-results.json'), JSON.stringify({ at: new Date().toISOString(), cores: os.cpus().length, rows, batch: b, targets }, null, 2));
await stop();
const mainOk = targets.every(([, ok]) => ok);
const scaleOk = part === 'main' || scale() === 0;
process.exit(mainOk && scaleOk ? 0 : 1);
