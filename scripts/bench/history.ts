/**
 * Bench of release histories (issue 12), end to end over HTTP against the real MariaDB:
 * - a wide XLSX of 100 releases × 180 quarters, checked and stored (POST /series/:series/history;
 *   target under 1 s), median of 3 series;
 * - a long CSV history of 200 series × 100 releases × 180 quarters = 3.6 M observations, one
 *   request per series (target under 60 s and under 1 GB peak for the process: server and client);
 * - InnoDB bytes per stored observation after that load (data and indexes of `observations`);
 * - the real-time revision analysis of one study (HP, λ = 1600) on the 100-vintage history
 *   (POST /studies/:id/realtime; target under 300 ms), median of 5 after a first run, with
 *   statsmodels' hpfilter on the same 100 vintages timed in the same run as the reference.
 * Run by `npm run bench -- history` on its own database, emptied first. Every number is invented.
 */
import { spawnSync } from 'node:child_process';
import type { AddressInfo } from 'node:net';
import ExcelJS from 'exceljs';
import { createApp } from '../../server/app.js';
import { loadConfig } from '../../server/config.js';
import { createDb, migrateLatest } from '../../server/db.js';
import { createLogger } from '../../server/lib/logger.js';
import { hashPassword } from '../../server/auth/password.js';
import { median } from './timing.js';

const RELEASES = 100;
const QUARTERS = 180;
const LONG_SERIES = 200;
const url = process.env.DATABASE_URL!;
const name = new URL(url).pathname.slice(1);
const server0 = new URL(url);
server0.pathname = '/';
const admin = createDb(server0.toString(), 2);
await admin.raw('DROP DATABASE IF EXISTS ??', [name]);
await admin.raw('CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci', [name]);
await admin.destroy();
const db = createDb(url, 10);
await migrateLatest(db);
const [uid] = await db('users').insert({ email: 'bench@demo.test', name: 'Bench', password_hash: await hashPassword('bench-password-1') });
await db('user_roles').insert([{ user_id: uid, role: 'steward' }, { user_id: uid, role: 'economist' }]);
const codes = [...Array.from({ length: 3 }, (_, i) => `W_${i}`), ...Array.from({ length: LONG_SERIES }, (_, i) => `L_${String(i).padStart(3, '0')}`)];
for (let i = 0; i < codes.length; i += 500) await db('series').insert(codes.slice(i, i + 500).map((code) => ({ code, title: `Bench history ${code}`, frequency: 'Q', unit: 'index', seasonal_adjustment: 'sa', source: 'bench (invented)' })));

const config = loadConfig({ NODE_ENV: 'production', LOG_LEVEL: 'silent', MAIL_MODE: 'off', DATABASE_URL: url, MAX_UPLOAD_MB: '200', PUBLIC_ORIGIN: 'http://127.0.0.1:1' });
const app = createApp({ config, db, logger: createLogger('silent') });
const server = app.listen(0, '127.0.0.1');
await new Promise((r) => server.once('listening', r));
const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
const signIn = await fetch(`${base}/api/v1/auth/sign-in`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email: 'bench@demo.test', password: 'bench-password-1' }) });
const headers = { Cookie: signIn.headers.get('set-cookie')!.split(';')[0], Origin: config.publicOrigin };

/** Every release publishes the 180 quarters; release r revises the last eight a little (its own way). */
const period = (i: number) => `${1980 + Math.floor(i / 4)}-Q${(i % 4) + 1}`;
const value = (s: number, r: number, i: number) => {
  const age = QUARTERS - 1 - i;
  return Number((100 * Math.exp(0.006 * i) * (1 + 0.03 * Math.sin(i / 6 + s)) * (1 + (age < 8 ? 0.001 * (8 - age) * Math.cos(r * 7 + i) : 0))).toFixed(3));
};
const releaseDate = (r: number) => `${2000 + Math.floor(r / 4)}-${String((r % 4) * 3 + 2).padStart(2, '0')}-15`;

async function wideXlsx(s: number) {
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Releases');
  ws.addRow(['Bench history, invented']);
  ws.addRow(['release date', ...Array.from({ length: RELEASES }, (_, r) => new Date(`${releaseDate(r)}T00:00:00Z`))]);
  ws.addRow(['period', ...Array.from({ length: RELEASES }, (_, r) => `release ${r + 1}`)]);
  for (let i = 0; i < QUARTERS; i++) ws.addRow([period(i), ...Array.from({ length: RELEASES }, (_, r) => value(s, r, i))]);
  return Buffer.from(await wb.xlsx.writeBuffer());
}

async function post(code: string, file: Buffer, filename: string) {
  const form = new FormData();
  form.append('file', new Blob([new Uint8Array(file)]), filename);
  const t0 = performance.now();
  const res = await fetch(`${base}/api/v1/series/${code}/history`, { method: 'POST', headers, body: form });
  const ms = performance.now() - t0;
  const body = await res.json();
  if (res.status !== 201) throw new Error(`${code}: ${res.status} ${JSON.stringify(body).slice(0, 300)}`);
  return { ms, vintages: body.vintages.length as number };
}

const wide: number[] = [];
for (let s = 0; s < 3; s++) {
  const file = await wideXlsx(s);
  const r = await post(`W_${s}`, file, 'wide.xlsx');
  if (r.vintages !== RELEASES) throw new Error(`expected ${RELEASES} vintages, got ${r.vintages}`);
  wide.push(r.ms);
}

const rssBefore = process.memoryUsage().rss;
const tLong = performance.now();
for (let s = 0; s < LONG_SERIES; s++) {
  let text = 'period,value,vintage\n';
  for (let r = 0; r < RELEASES; r++) for (let i = 0; i < QUARTERS; i++) text += `${period(i)},${value(s, r, i)},${releaseDate(r)}\n`;
  await post(`L_${String(s).padStart(3, '0')}`, Buffer.from(text), 'long.csv');
}
const longSeconds = (performance.now() - tLong) / 1000;
const peakMb = (process.resourceUsage().maxRSS * 1024) / 1048576;
const [{ n }] = await db('observations').count({ n: '*' });
const longObs = LONG_SERIES * RELEASES * QUARTERS;
await db.raw('ANALYZE TABLE observations');
const [[size]] = await db.raw(`SELECT data_length + index_length AS bytes, data_length AS data, index_length AS idx FROM information_schema.tables WHERE table_schema = ? AND table_name = 'observations'`, [name]);
const bytesPerObs = Number(size.bytes) / Number(n);

const study = await fetch(`${base}/api/v1/studies`, { method: 'POST', headers: { ...headers, 'Content-Type': 'application/json' }, body: JSON.stringify({ title: 'Bench real time', seriesId: (await db('series').where('code', 'W_0').first()).id, vintage: 'latest', transform: 'log100', method: 'hp', params: { lambda: 1600 } }) }).then((r) => r.json());
const realtime: number[] = [];
for (let k = 0; k < 6; k++) {
  const t0 = performance.now();
  const res = await fetch(`${base}/api/v1/studies/${study.id}/realtime`, { method: 'POST', headers });
  await res.json();
  if (res.status !== 200) throw new Error(`realtime ${res.status}`);
  realtime.push(performance.now() - t0);
}
const warm = median(realtime.slice(1));
// The reference: statsmodels' HP filter on the same 100 vintages (log × 100), timed in the same run.
const vintages = Array.from({ length: RELEASES }, (_, r) => Array.from({ length: QUARTERS }, (_, i) => 100 * Math.log(value(0, r, i))));
const py = spawnSync('/usr/bin/python3', ['-c', `
import json, sys, time
from statsmodels.tsa.filters.hp_filter import hpfilter
import numpy as np
vs = [np.array(v) for v in json.load(sys.stdin)]
ts = []
for k in range(5):
    t0 = time.perf_counter()
    for v in vs: hpfilter(v, 1600)
    ts.append((time.perf_counter() - t0) * 1000)
print(sorted(ts)[2])
`], { input: JSON.stringify(vintages), encoding: 'utf8' });
const reference = Number(py.stdout.trim());

server.close();
await app.locals.shutdown();
await db.destroy();

const wideMs = median(wide);
const ok = wideMs < 1000 && longSeconds < 60 && peakMb < 1024 && Number(n) === longObs + 3 * (longObs / LONG_SERIES) && warm < 300;
console.log(`\nTidegauge history bench — ${new Date().toISOString()}`);
console.log(`wide XLSX ${RELEASES} releases × ${QUARTERS} quarters, checked and stored over HTTP: median ${wideMs.toFixed(0)} ms of 3 (${wide.map((x) => x.toFixed(0)).join(', ')}) (target < 1000 ms)${wideMs < 1000 ? '' : '  ✗ MISSED'}`);
console.log(`long CSV ${LONG_SERIES} series × ${RELEASES} releases × ${QUARTERS} quarters, one request per series: ${(longObs / 1e6).toFixed(2)} M observations stored in ${longSeconds.toFixed(1)} s (target < 60 s)${longSeconds < 60 ? '' : '  ✗ MISSED'}`);
console.log(`peak memory of the process (server and client): ${peakMb.toFixed(0)} MB, ${((peakMb * 1048576 - rssBefore) / 1048576).toFixed(0)} MB above the start of the long load (target < 1024 MB)${peakMb < 1024 ? '' : '  ✗ MISSED'}`);
console.log(`InnoDB: ${Number(n).toLocaleString('en-US')} observation rows, ${(Number(size.data) / 1048576).toFixed(0)} MB data + ${(Number(size.idx) / 1048576).toFixed(0)} MB indexes = ${bytesPerObs.toFixed(1)} bytes per observation`);
console.log(`real-time analysis (HP λ = 1600, log × 100) of one study on ${RELEASES} vintages over HTTP: first ${realtime[0].toFixed(0)} ms, then median ${warm.toFixed(0)} ms of 5 (target < 300 ms)${warm < 300 ? '' : '  ✗ MISSED'}; statsmodels hpfilter on the same ${RELEASES} vintages: ${reference.toFixed(0)} ms (ratio ${(warm / reference).toFixed(2)})\n`);
process.exit(ok ? 0 : 1);
