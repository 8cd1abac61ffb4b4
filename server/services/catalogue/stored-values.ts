/**
 * The one read path for stored values to decompose: a vintage as a contiguous array from its
 * first to its last period (missing periods are null), for one series or thousands at once, in a
 * handful of queries, through a cache of immutable vintages. Worker threads load this module on
 * its own (it imports nothing of the rest of the Catalogue but the row mappers).
 */
import { formatPeriod, periodIndex } from '../../analysis/periods.js';
import { fastQuery, type Db } from '../../db.js';
import { HttpError, notFound } from '../../lib/errors.js';
import type { Series, Vintage } from '../../schemas/catalogue.js';
import type { Frequency } from '../../schemas/frequency.js';
import { toSeries, toVintage } from './rows.js';
import { vintageWhat } from './vintages.js';

export interface SeriesValues {
  series: Series;
  vintage: Vintage & { id: number };
  start: string | null;
  periods: string[];
  values: (number | null)[];
}

export interface ValuesRef {
  seriesId: number;
  vintage: number | 'latest';
}

type Contiguous = Pick<SeriesValues, 'start' | 'periods' | 'values'>;

/** Observations as a contiguous array from the first to the last period (missing periods are null). */
export function contiguous(obs: { periods: string[]; values: (number | null)[] }, frequency: Frequency): Contiguous {
  if (obs.periods.length === 0) return { start: null, periods: [], values: [] };
  const first = periodIndex(obs.periods[0], frequency)!;
  const last = periodIndex(obs.periods[obs.periods.length - 1], frequency)!;
  const values = new Array<number | null>(last - first + 1).fill(null);
  obs.periods.forEach((p, i) => (values[periodIndex(p, frequency)! - first] = obs.values[i]));
  const periods = values.map((_, i) => formatPeriod(first + i, frequency));
  return { start: obs.periods[0], periods, values };
}

/**
 * A least-recently-used cache of the contiguous observations of vintages, by vintage id. Safe
 * across server instances because a stored vintage never changes; bounded by the number of values.
 */
class ObservationCache {
  // Compact entries: the first period and the values in a Float64Array (NaN for missing). Typed
  // arrays live outside the garbage-collected heap, so a full cache costs the collector nothing.
  private map = new Map<number, { start: string | null; frequency: Frequency; values: Float64Array }>();
  private size = 0;
  constructor(public maxValues: number) {}
  get(id: number): Contiguous | undefined {
    const v = this.map.get(id);
    if (!v) return undefined;
    this.map.delete(id);
    this.map.set(id, v);
    const values = Array.from(v.values, (x) => (Number.isNaN(x) ? null : x));
    const i0 = v.start === null ? 0 : periodIndex(v.start, v.frequency)!;
    return { start: v.start, values, periods: values.map((_, i) => formatPeriod(i0 + i, v.frequency)) };
  }
  set(id: number, v: Contiguous, frequency: Frequency) {
    if (v.values.length > this.maxValues / 10 || this.map.has(id)) return;
    this.map.set(id, { start: v.start, frequency, values: Float64Array.from(v.values, (x) => (x === null ? NaN : x)) });
    this.size += v.values.length;
    while (this.size > this.maxValues) {
      const [oldest, data] = this.map.entries().next().value!;
      this.map.delete(oldest);
      this.size -= data.values.length;
    }
  }
}
const observationCache = new ObservationCache(2_000_000);

/** Sets the cache's bound in values (config.observationCacheValues; 0 turns it off). */
export function configureObservationCache(maxValues: number) {
  observationCache.maxValues = maxValues;
}

/**
 * Values for many (series, vintage) pairs at once. Returns, per "id@vintage" key, the values or
 * the 404 a single lookup gives.
 */
export async function readStoredValues(db: Db, refs: ValuesRef[]): Promise<Map<string, SeriesValues | HttpError>> {
  const out = new Map<string, SeriesValues | HttpError>();
  const ids = [...new Set(refs.map((r) => r.seriesId))];
  const series = new Map<number, Series>();
  const vintagesBySeries = new Map<number, Record<string, any>[]>();
  for (let i = 0; i < ids.length; i += 1000) {
    const chunk = ids.slice(i, i + 1000);
    // Raw SQL on this hot path (every decomposition of a stored series): one query for the series
    // and their vintages, one for the observations.
    const rows = await fastQuery(
      db,
      `SELECT s.*, v.id AS v_id, v.number AS v_number, v.as_of AS v_as_of, v.note AS v_note, v.row_count AS v_row_count, v.checksum AS v_checksum,
              v.first_period AS v_first_period, v.last_period AS v_last_period, v.created_at AS v_created_at, v.created_by AS v_created_by, v.load_id AS v_load_id
         FROM series s LEFT JOIN vintages v ON v.series_id = s.id
        WHERE s.id IN (${chunk.map(() => '?').join(',')})`,
      chunk,
    );
    for (const r of rows) {
      if (!series.has(r.id)) series.set(r.id, toSeries(r));
      if (r.v_id === null) continue;
      const v = { id: r.v_id, number: r.v_number, as_of: r.v_as_of, note: r.v_note, row_count: r.v_row_count, checksum: r.v_checksum, first_period: r.v_first_period, last_period: r.v_last_period, created_at: r.v_created_at, created_by: r.v_created_by, load_id: r.v_load_id };
      (vintagesBySeries.get(r.id) ?? vintagesBySeries.set(r.id, []).get(r.id)!).push(v);
    }
  }
  const wanted = new Map<number, { key: string; series: Series; vintage: Record<string, any> }[]>();
  for (const r of refs) {
    const key = `${r.seriesId}@${r.vintage}`;
    if (out.has(key)) continue;
    const s = series.get(r.seriesId);
    if (!s) {
      out.set(key, notFound('The series'));
      continue;
    }
    const list = vintagesBySeries.get(r.seriesId) ?? [];
    const v = r.vintage === 'latest' ? list.reduce<Record<string, any> | undefined>((a, b) => (!a || b.number > a.number ? b : a), undefined) : list.find((x) => x.number === r.vintage);
    if (!v) {
      out.set(key, notFound(vintageWhat(r.vintage)));
      continue;
    }
    const entry = wanted.get(v.id) ?? wanted.set(v.id, []).get(v.id)!;
    entry.push({ key, series: s, vintage: v });
    out.set(key, undefined as never);
  }
  // Vintages never change, so their observations are cached by vintage id (bounded in size).
  for (const [id, list] of wanted) {
    const hit = observationCache.get(id);
    if (!hit) continue;
    for (const w of list) out.set(w.key, { series: w.series, vintage: { ...toVintage(w.vintage), id }, ...hit });
    wanted.delete(id);
  }
  const vintageIds = [...wanted.keys()];
  for (let i = 0; i < vintageIds.length; i += 200) {
    const chunk = vintageIds.slice(i, i + 200);
    const obs = new Map<number, { periods: string[]; values: (number | null)[] }>(chunk.map((id) => [id, { periods: [], values: [] }]));
    const rows = await fastQuery<{ vintage_id: number; period: string; value: number | null }>(db, `SELECT vintage_id, period, value FROM observations WHERE vintage_id IN (${chunk.map(() => '?').join(',')}) ORDER BY vintage_id, period`, chunk);
    for (const r of rows) {
      const o = obs.get(r.vintage_id)!;
      o.periods.push(r.period);
      o.values.push(r.value === null ? null : Number(r.value));
    }
    for (const id of chunk) {
      const list = wanted.get(id)!;
      const data = contiguous(obs.get(id)!, list[0].series.frequency);
      observationCache.set(id, data, list[0].series.frequency);
      for (const w of list) out.set(w.key, { series: w.series, vintage: { ...toVintage(w.vintage), id }, ...data });
    }
  }
  return out;
}

/** One series' values (its number or "latest"); throws the 404 when the series or vintage is missing. */
export async function readSeriesValues(db: Db, seriesId: number, which: number | 'latest'): Promise<SeriesValues> {
  const found = (await readStoredValues(db, [{ seriesId, vintage: which }])).get(`${seriesId}@${which}`)!;
  if (found instanceof HttpError) throw found;
  return found;
}
