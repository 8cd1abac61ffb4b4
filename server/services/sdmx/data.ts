/**
 * SDMX REST data queries on our series: `data/{flow}/{key}` with the standard's `startPeriod`,
 * `endPeriod` and `updatedAfter`, and `asOf` (a date: each series as in the vintage in force on
 * that day, `vintageInForce`); without `asOf`, each series' latest vintage. The answer is one data
 * message (importers/sdmx-out.ts) with the vintage's number and release date as attributes.
 */
import type { Db } from '../../db.js';
import { badRequest, HttpError, notFound } from '../../lib/errors.js';
import type { SdmxDataMessage, SdmxSeriesOut } from '../../importers/sdmx-out.js';
import { periodWindow, selectByKey } from '../../sdmx/query.js';
import { observationsOf, resolveVintage, vintageInForce, type StoredVintage } from '../catalogue/vintages.js';
import { DIMENSIONS, DSD, FLOW, matchesRef } from './structure.js';

/** At most this many series in one answer; a wider query is asked to narrow its key. */
export const MAX_SERIES = 2000;

export interface DataQuery {
  flow: string;
  key?: string;
  startPeriod?: string;
  endPeriod?: string;
  updatedAfter?: string;
  asOf?: string;
}

const PERIOD = /^\d{4}(-Q[1-4]|-(0[1-9]|1[0-2]))?$/;

/** Reads a flow reference: "SERIES", "TIDEGAUGE,SERIES", "TIDEGAUGE,SERIES,1.0" or "all". */
function checkFlow(flow: string) {
  const parts = flow.split(',');
  const [agency, id, version] = parts.length === 1 ? [undefined, parts[0], undefined] : parts;
  if (!matchesRef(FLOW, agency, id, version)) throw notFound(`The dataflow ${flow} (this service has ${FLOW.agency},${FLOW.id},${FLOW.version})`);
}

export async function dataMessage(db: Db, q: DataQuery): Promise<SdmxDataMessage> {
  checkFlow(q.flow);
  for (const [name, value] of [['startPeriod', q.startPeriod], ['endPeriod', q.endPeriod]] as const) {
    if (value && !PERIOD.test(value)) throw badRequest('invalid_period', `${name} is an SDMX period such as 2020, 2020-Q1 or 2020-01 (got "${value.slice(0, 20)}").`);
  }
  if (q.asOf && !/^\d{4}-\d{2}-\d{2}$/.test(q.asOf)) throw badRequest('invalid_as_of', `asOf is a date, YYYY-MM-DD (got "${q.asOf.slice(0, 30)}").`);
  const updatedAfter = q.updatedAfter ? new Date(q.updatedAfter) : null;
  if (updatedAfter && Number.isNaN(updatedAfter.getTime())) throw badRequest('invalid_updated_after', `updatedAfter is a date and time, such as 2024-05-01T00:00:00Z (got "${q.updatedAfter!.slice(0, 30)}").`);
  const all: { id: number; code: string; frequency: string; unit: string }[] = await db('series').orderBy('code').select('id', 'code', 'frequency', 'unit');
  const chosen = selectByKey(all, (s) => [s.frequency, s.code], q.key);
  if (chosen.length > MAX_SERIES) throw badRequest('too_many_series', `The key selects ${chosen.length} series; at most ${MAX_SERIES} are answered at once. Narrow the key (FREQ.SERIES_CODE, "+" between codes).`);
  const series: SdmxSeriesOut[] = [];
  for (const s of chosen) {
    let v: StoredVintage;
    try {
      v = q.asOf ? await vintageInForce(db, s.id, q.asOf) : await resolveVintage(db, s.id, 'latest');
    } catch (error) {
      if (error instanceof HttpError && error.status === 404) continue; // no vintage (by then)
      throw error;
    }
    if (updatedAfter && new Date(v.createdAt) <= updatedAfter) continue;
    const obs = await observationsOf(db, v.id);
    const w = periodWindow(obs.periods, obs.values, q.startPeriod, q.endPeriod);
    if (!w.periods.length) continue;
    series.push({ key: [s.frequency, s.code], attributes: { UNIT_MEASURE: s.unit, VINTAGE: String(v.number), AS_OF: v.asOf }, periods: w.periods, values: w.values });
  }
  if (!series.length) throw new HttpError(404, 'no_results', 'No data matches this query (key, periods, asOf, updatedAfter); SDMX services answer 404 when nothing matches.');
  return { flow: FLOW, structure: DSD, dimensions: DIMENSIONS, series, sender: FLOW.agency };
}
