/**
 * Bench of a large load: one SDMX-CSV file with 2 000 monthly series × 500 months
 * (1 000 000 observations), previewed and stored through POST /api/v1/loads, end to end over HTTP
 * against the real MariaDB. Target (issue "Catalogue, loads and vintages"): under 15 s and under
 * 1 GB peak memory. Run by `npm run bench` on its own database (tidegauge_bench), emptied first.
 */
import type { AddressInfo } from 'node:net';
import { createApp } from '../../server/app.js';
import { loadConfig } from '../../server/config.js';
import { createDb, migrateLatest } from '../../server/db.js';
import { createLogger } from '../../server/lib/logger.js';
import { hashPassword } from '../../server/auth/password.js';

const SERIES = 2000;
const MONTHS = 500;
const url = process.env.DATABASE_URL!;
// A clean slate every run.
const name = new URL(url).pathname.slice(1);
const server0 = new URL(url);
server0.pathname = '/';
const db = createDb(server0.toString(), 2);
await db.raw('DROP DATABASE IF EXISTS ??', [name]);
await db.raw('CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci', [name]);
await db.destroy();
const fresh = createDb(url, 10);
await migrateLatest(fresh);
const [uid] = await fresh('users').insert({ email: 'bench@demo.test', name: 'Bench', password_hash: await hashPassword('bench-password-1') });
await fresh('user_roles').insert({ user_id: uid, role: 'steward' });
const rows = Array.from({ length: SERIES }, (_, i) => ({ code: `B_${String(i).padStart(4, '0')}`, title: `Bench series ${i}`, frequency: 'M', unit: 'index', seasonal_adjustment: 'sa', source: 'bench' }));
for (let i = 0; i < rows.length; i += 500) await fresh('series').insert(rows.slice(i, i + 500));

const config = loadConfig({ NODE_ENV: 'production', LOG_LEVEL: 'silent', MAIL_MODE: 'off', DATABASE_URL: url, MAX_UPLOAD_MB: '200', PUBLIC_ORIGIN: 'http://127.0.0.1:1' });
const app = createApp({ config, db: fresh, logger: createLogger('silent') });
const server = app.listen(0, '127.0.0.1');
await new Promise((r) => server.once('listening', r));
const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

const parts: Buffer[] = [Buffer.from('STRUCTURE,STRUCTURE_ID,ACTION,FREQ,SERIES_CODE,TIME_PERIOD,OBS_VALUE,UNIT_MEASURE\n')];
for (let s = 0; s < SERIES; s++) {
  const code = `B_${String(s).padStart(4, '0')}`;
  let v = 100;
  let chunk = '';
  for (let m = 0; m < MONTHS; m++) {
    v += Math.sin(s + m / 7) * 0.3;
    const y = 1985 + Math.floor(m / 12);
    chunk += `dataflow,BENCH:DF(1.0),I,M,${code},${y}-${String((m % 12) + 1).padStart(2, '0')},${v.toFixed(3)},index\n`;
  }
  parts.push(Buffer.from(chunk));
}
const file = Buffer.concat(parts);
parts.length = 0;
(globalThis as { gc?: () => void }).gc?.();

const signIn = await fetch(`${base}/api/v1/auth/sign-in`, { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email: 'bench@demo.test', password: 'bench-password-1' }) });
const cookie = signIn.headers.get('set-cookie')!.split(';')[0];
const before = process.memoryUsage().rss;
const t0 = performance.now();
const form = new FormData();
form.append('file', new Blob([file]), 'bench.sdmx.csv');
form.append('asOf', '2025-01-31');
const res = await fetch(`${base}/api/v1/loads`, { method: 'POST', headers: { Cookie: cookie, Origin: base }, body: form });
const body = await res.json();
const seconds = (performance.now() - t0) / 1000;
const peakMb = (process.resourceUsage().maxRSS * 1024) / 1048576;
const [{ n }] = await fresh('observations').count({ n: '*' });
server.close();
await app.locals.shutdown();
await fresh.destroy();

const ok = res.status === 201 && Number(n) === SERIES * MONTHS && seconds < 15 && peakMb < 1024;
console.log(`\nTidegauge load bench — ${new Date().toISOString()}`);
console.log(`file: ${(file.length / 1048576).toFixed(1)} MB SDMX-CSV, ${SERIES} monthly series × ${MONTHS} months = ${(SERIES * MONTHS).toLocaleString('en-US')} observations`);
console.log(`answer: ${res.status}, ${body.vintages?.length ?? 0} vintages; ${Number(n).toLocaleString('en-US')} observation rows in MariaDB`);
console.log(`time: ${seconds.toFixed(1)} s (target < 15 s)${seconds < 15 ? '' : '  ✗ MISSED'}`);
console.log(`peak memory of the process (server and client): ${peakMb.toFixed(0)} MB, ${((peakMb * 1048576 - before) / 1048576).toFixed(0)} MB above its start (target < 1024 MB)${peakMb < 1024 ? '' : '  ✗ MISSED'}\n`);
process.exit(ok ? 0 : 1);
