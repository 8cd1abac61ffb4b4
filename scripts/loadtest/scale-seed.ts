/**
 * The empty Catalogue of the scale load test: 10 000 quarterly series (invented) and one steward
 * and economist with an API token. Their 20 releases are then loaded over HTTP by
 * scripts/loadtest/scale.mjs, through the same path a steward's loads take. Writes the token and
 * the series ids to the file given as the first argument.
 */
import fs from 'node:fs';
import { freshLoadTestDb } from './fresh-db.js';

const SCALE_SERIES = 10_000;

const { db, token } = await freshLoadTestDb({ email: 'scale@demo.test', name: 'Scale Test' });
for (let s0 = 0; s0 < SCALE_SERIES; s0 += 1000) {
  const rows = [];
  for (let s = s0; s < s0 + 1000; s++) {
    rows.push({ code: `SC_${String(s).padStart(5, '0')}`, title: `Scale-test series ${s} (invented)`, frequency: 'Q', unit: 'index', seasonal_adjustment: 'sa', source: 'invented for the scale load test' });
  }
  await db('series').insert(rows);
}
const ids = (await db('series').orderBy('id').select('id')).map((r) => r.id as number);
fs.writeFileSync(process.argv[2], JSON.stringify({ token, ids }));
console.log(`[scale] ${ids.length} series defined`);
await db.destroy();
