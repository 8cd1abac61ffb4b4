/**
 * The Catalogue of the scale load test (issue 16): 10 000 quarterly series (invented; SCALE_SERIES), each with a
 * 20-release history of 120 quarters from 1995-Q1 whose last eight periods are revised in every
 * release, and one steward and economist with an API token. Writes the token and the series ids
 * to the file given as the first argument.
 *
 * Two ways to build the releases (the second argument):
 * - `sql` (the default): straight into MariaDB with multi-row INSERTs, one transaction per release,
 *   writing what a load writes (a `loads` row, one vintage per series with the checksum of
 *   `checksumOf`, the observations, `keepVintageMetadata`). The load test is about reading at
 *   scale, and this builds the 24 M rows several times faster than the HTTP path.
 * - `http`: only the series are defined here; each release is written as one SDMX-CSV file of
 *   10 000 series into the folder given as the third argument, and scripts/loadtest/scale.mjs
 *   sends them to POST /api/v1/loads, the path a steward's loads take.
 */
import fs from 'node:fs';
import path from 'node:path';
import { checksumOf, keepVintageMetadata } from '../../server/services/catalogue/vintages.js';
import { freshLoadTestDb } from './fresh-db.js';

const SCALE_SERIES = Number(process.env.SCALE_SERIES || 10_000);
const RELEASES = 20;
const PERIODS = 120;

const code = (s: number) => `SC_${String(s).padStart(5, '0')}`;
const period = (q: number) => `${1995 + Math.floor(q / 4)}-Q${(q % 4) + 1}`;
/** Release r (1…20) of series s at quarter q: a level with a wave, the last eight quarters revised by r. */
const value = (s: number, q: number, r: number) => {
  const level = 100 + (s % 97) + q * 0.5 + Math.sin(q / 3 + s) * 2;
  const revision = q >= PERIODS - 8 ? r * 0.01 * (q - PERIODS + 9) : 0;
  return Number((level + revision).toFixed(3));
};
/** The as-of date of release r: quarterly from 2020. */
const asOf = (r: number) => new Date(Date.UTC(2020, 0, 1) + r * 91 * 86_400_000).toISOString().slice(0, 10);

const [stateFile, mode = 'sql', releaseDir] = process.argv.slice(2);
const { db, uid, token } = await freshLoadTestDb({ email: 'scale@demo.test', name: 'Scale Test' });
for (let s0 = 0; s0 < SCALE_SERIES; s0 += 1000) {
  const rows = [];
  for (let s = s0; s < Math.min(SCALE_SERIES, s0 + 1000); s++) {
    rows.push({ code: code(s), title: `Scale-test series ${s} (invented)`, frequency: 'Q', unit: 'index', seasonal_adjustment: 'sa', source: 'invented for the scale load test' });
  }
  await db('series').insert(rows);
}
const ids = (await db('series').orderBy('id').select('id')).map((r) => r.id as number);
const periods = Array.from({ length: PERIODS }, (_, q) => period(q));
const releases: { file: string; asOf: string }[] = [];

if (mode === 'http') {
  fs.mkdirSync(releaseDir, { recursive: true });
  for (let r = 1; r <= RELEASES; r++) {
    const lines = ['STRUCTURE,STRUCTURE_ID,ACTION,FREQ,SERIES_CODE,TIME_PERIOD,OBS_VALUE'];
    for (let s = 0; s < ids.length; s++) for (let q = 0; q < PERIODS; q++) lines.push(`df,SC:DF(1.0),I,Q,${code(s)},${periods[q]},${value(s, q, r).toFixed(3)}`);
    const file = path.join(releaseDir, `scale-release-${r}.csv`);
    fs.writeFileSync(file, lines.join('\n') + '\n');
    releases.push({ file, asOf: asOf(r) });
  }
} else {
  for (let r = 1; r <= RELEASES; r++) {
    const t0 = Date.now();
    await db.transaction(async (trx) => {
      // The rows are consistent by construction; the session skips the per-row foreign-key lookups.
      await trx.raw('SET SESSION foreign_key_checks = 0');
      const [loadId] = await trx('loads').insert({ created_by: uid, filename: `scale-release-${r}.csv`, format: 'sdmx-csv', series_count: ids.length, observation_count: ids.length * PERIODS, note: null });
      for (let i = 0; i < ids.length; i += 1000) {
        await trx('vintages').insert(
          ids.slice(i, i + 1000).map((id, k) => {
            const values = periods.map((_, q) => value(i + k, q, r));
            return { series_id: id, number: r, as_of: asOf(r), note: null, row_count: PERIODS, checksum: checksumOf(periods, values), first_period: periods[0], last_period: periods[PERIODS - 1], load_id: loadId, created_by: uid };
          }),
        );
      }
      const vintageOf = new Map<number, number>((await trx('vintages').where('load_id', loadId).select('id', 'series_id')).map((v) => [v.series_id, v.id]));
      for (let i = 0; i < ids.length; i += 100) {
        let sql = 'INSERT INTO observations (vintage_id, period, value) VALUES ';
        for (let s = i; s < Math.min(ids.length, i + 100); s++) {
          const vid = vintageOf.get(ids[s])!;
          for (let q = 0; q < PERIODS; q++) sql += `${s > i || q > 0 ? ',' : ''}(${vid},'${periods[q]}',${value(s, q, r)})`;
        }
        await trx.raw(sql);
      }
      await keepVintageMetadata(trx, loadId);
      await trx.raw('SET SESSION foreign_key_checks = 1');
    });
    console.log(`[scale] release ${r} of ${RELEASES}: ${ids.length} vintages in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
  }
}
fs.writeFileSync(stateFile, JSON.stringify({ token, ids, releases }));
console.log(`[scale] ${ids.length} series defined${mode === 'http' ? `; ${RELEASES} release files written` : `, ${RELEASES} releases stored`}`);
await db.destroy();
