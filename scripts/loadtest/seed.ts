/**
 * Prepares the load-test database: 10 000 quarterly series of 200 observations each (invented
 * random walks), one economist with an API token. Writes the token and the series ids to the file
 * given as the first argument.
 */
import fs from 'node:fs';
import { checksumOf } from '../../server/services/catalogue/vintages.js';
import { formatPeriod, periodIndex } from '../../server/analysis/periods.js';
import { freshLoadTestDb } from './fresh-db.js';

const SERIES = 10_000;
const POINTS = 200;
const { db, uid, token } = await freshLoadTestDb({ email: 'load@demo.test', name: 'Load Test' });

const start = periodIndex('1975-Q1', 'Q')!;
const periods = Array.from({ length: POINTS }, (_, i) => formatPeriod(start + i, 'Q'));
let seed = 42;
const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
const t0 = Date.now();
for (let s0 = 0; s0 < SERIES; s0 += 500) {
  const rows = [];
  for (let s = s0; s < s0 + 500; s++) rows.push({ code: `LT_${String(s).padStart(5, '0')}`, title: `Load-test series ${s} (invented)`, frequency: 'Q', unit: 'index', seasonal_adjustment: 'sa', source: 'invented for the load test' });
  await db('series').insert(rows);
}
const ids = (await db('series').orderBy('id').select('id')).map((r) => r.id as number);
for (let k = 0; k < ids.length; k += 100) {
  const chunk = ids.slice(k, k + 100);
  const vrows = [];
  const values: number[][] = [];
  for (const id of chunk) {
    let v = 100;
    const vals = periods.map(() => (v += rand() - 0.48 + Math.sin(v) * 0.1));
    const rounded = vals.map((x) => Number(x.toFixed(4)));
    values.push(rounded);
    vrows.push({ series_id: id, number: 1, as_of: '2025-01-31', row_count: POINTS, checksum: checksumOf(periods, rounded), first_period: periods[0], last_period: periods[POINTS - 1], created_by: uid });
  }
  await db('vintages').insert(vrows);
  const vids = await db('vintages').whereIn('series_id', chunk).orderBy('series_id').select('id');
  let sql = 'INSERT INTO observations (vintage_id, period, value) VALUES ';
  vids.forEach((v, i) => {
    values[i].forEach((x, j) => (sql += `${i || j ? ',' : ''}(${v.id},'${periods[j]}',${x})`));
  });
  await db.raw(sql);
}
fs.writeFileSync(process.argv[2], JSON.stringify({ token, ids }));
console.log(`[loadtest] seeded ${SERIES} series × ${POINTS} quarters in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
await db.destroy();
