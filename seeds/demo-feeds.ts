/**
 * The demo's feed (invented, like all demo data): the Estuary statistics office's national
 * accounts and retail trade, pulled from the local fake SDMX source that `npm start` runs beside
 * the app (FAKE_SDMX_PORT). Its three series start empty: "Run now" on the Feeds page stores their
 * first vintages, and `POST …/rest/release` on the fake source publishes a new release to pull.
 */
import type { Db } from '../server/db.js';
import { createFeed } from '../server/services/feeds/registry.js';
import { createSeries } from '../server/services/catalogue/series.js';
import { FAKE_FLOW, FAKE_SERIES } from '../server/sdmx/fake-data.js';

const CODES: Record<string, string> = { GDP_VOL: 'EST_NA_GDP_VOL', HOURS: 'EST_NA_HOURS', RETAIL_VOL: 'EST_RETAIL_VOL' };

/** `sourceBase`: the fake source's base address (http://127.0.0.1:PORT/rest). */
export async function seedDemoFeed(db: Db, stewardId: number, sourceBase: string) {
  for (const s of FAKE_SERIES) {
    await createSeries(db, stewardId, {
      code: CODES[s.key[2]],
      title: `Estuary: ${s.title.replace(/ \(invented\)$/, '')}, statistics office feed`,
      frequency: s.key[0],
      unit: s.unit,
      seasonalAdjustment: 'sa',
      source: 'Estuary statistics office (invented), through the demo feed',
      notes: 'Invented demo data from the local fake SDMX source.',
    });
  }
  const flow = `${FAKE_FLOW.agency},${FAKE_FLOW.id},${FAKE_FLOW.version}`;
  return createFeed(db, stewardId, {
    name: 'Estuary statistics office (invented)',
    url: `${sourceBase}/data/${flow}/Q+M.EST.GDP_VOL+HOURS+RETAIL_VOL`,
    schedule: '30 9 * * 1-5',
    headers: [],
    enabled: true,
    mappings: FAKE_SERIES.map((s) => ({ key: s.key.join('.'), series: CODES[s.key[2]] })),
  });
}
