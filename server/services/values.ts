/**
 * Reading stored observations for decomposition: one series, or thousands at once. Kept apart
 * from the Catalogue service so that worker threads can load it without the rest.
 */
import type { Frequency } from '../analysis/frequency.js';
import { formatPeriod, periodIndex } from '../analysis/periods.js';
import { fastQuery, type Db } from '../db.js';
import { HttpError, notFound } from '../lib/errors.js';
import type { SeriesRow, VintageInfo } from './catalogue.js';
import type { BatchItem } from '../workers/decompose-task.js';

export interface SeriesValues {
  series: SeriesRow;
  vintage: VintageInfo & { id: number };
  start: string | null;
  periods: string[];
  values: (number | null)[];
}

export const iso = (d: Date | string | null) => (d ? new Date(d).toISOString() : null);
export const dateOnly = (d: Date | string) => (d instanceof Date ? d.toISOString().slice(0, 10) : String(d).slice(0, 10));

export function toSeries(r: Record<string, any>): SeriesRow {
  return {
    id: r.id,
    code: r.code,
    title: r.title,
    frequency: r.frequency,
    unit: r.unit,
    seasonalAdjustment: r.seasonal_adjustment,
    source: r.source,
    notes: r.notes,
    sdmxKey: r.sdmx_key,
    createdAt: iso(r.created_at)!,
    updatedAt: iso(r.updated_at)!,
  };
}

export function toVintage(r: Record<string, any>): VintageInfo {
  return {
    number: r.number,
    asOf: dateOnly(r.as_of),
    note: r.note,
    rowCount: r.row_count,
    checksum: r.checksum,
    firstPeriod: r.first_period,
    lastPeriod: r.last_period,
    createdAt: iso(r.created_at)!,
    createdBy: r.created_by ? { id: r.created_by, name: r.creator_name ?? '' } : null,
    loadId: r.load_id ?? null,
  };
}


/** Observations as a contiguous array from the first to the last period (missing periods are null). */
export function contiguous(obs: { periods: string[]; values: (number | null)[] }, frequency: Frequency) {
  if (obs.periods.length === 0) return { start: null as string | null, periods: [] as string[], values: [] as (number | null)[] };
  const first = periodIndex(obs.periods[0], frequency)!;
  const last = periodIndex(obs.periods[obs.periods.length - 1], frequency)!;
  const values = new Array<number | null>(last - first + 1).fill(null);
  obs.periods.forEach((p, i) => (values[periodIndex(p, frequency)! - first] = obs.values[i]));
  const periods = values.map((_, i) => formatPeriod(first + i, frequency));
  return { start: obs.periods[0] as string | null, periods, values };
}


/**
 * seriesValues for many (series, vintage) pairs at once, in a handful of queries: what a batch of
 * thousands of stored series needs. Returns, per "id@vintage" key, the values or the error a single
 * lookup would have given.
 */
/**
 * A least-recently-used cache of the contiguous observations of vintages, by vintage id. Safe
 * across server instances because a stored vintage never changes; bounded by the number of values.
 */
class ObservationCache {
  // Compact entries: the first period and the values in a Float64Array (NaN for missing). Typed
  // arrays live outside the garbage-collected heap, so a full cache costs the collector nothing.
  private map = new Map<number, { start: string | null; frequency: Frequency; values: Float64Array }>();
  private size = 0;
  constructor(private readonly maxValues: number) {}
  get(id: number): ReturnType<typeof contiguous> | undefined {
    const v = this.map.get(id);
    if (!v) return undefined;
    this.map.delete(id);
    this.map.set(id, v);
    const values = Array.from(v.values, (x) => (Number.isNaN(x) ? null : x));
    const i0 = v.start === null ? 0 : periodIndex(v.start, v.frequency)!;
    return { start: v.start, values, periods: values.map((_, i) => formatPeriod(i0 + i, v.frequency)) };
  }
  set(id: number, v: ReturnType<typeof contiguous>, frequency: Frequency) {
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
const observationCache = new ObservationCache(Number(process.env.OBSERVATION_CACHE_VALUES || 2_000_000));

export async function manySeriesValues(db: Db, refs: { seriesId: number; vintage: number | 'latest' }[]): Promise<Map<string, SeriesValues | HttpError>> {
  const out = new Map<string, SeriesValues | HttpError>();
  const ids = [...new Set(refs.map((r) => r.seriesId))];
  const series = new Map<number, SeriesRow>();
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
  const wanted = new Map<number, { key: string; series: SeriesRow; vintage: Record<string, any> }[]>();
  for (const r of refs) {
    const key = `${r.seriesId}@${r.vintage}`;
    if (out.has(key)) continue;
    const s = series.get(r.seriesId);
    if (!s) {
      out.set(key, notFound('The series') as HttpError);
      continue;
    }
    const list = vintagesBySeries.get(r.seriesId) ?? [];
    const v = r.vintage === 'latest' ? list.reduce<Record<string, any> | undefined>((a, b) => (!a || b.number > a.number ? b : a), undefined) : list.find((x) => x.number === r.vintage);
    if (!v) {
      out.set(key, notFound(r.vintage === 'latest' ? 'A vintage of this series (none is loaded yet)' : `Vintage ${r.vintage} of this series`) as HttpError);
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


export type RawItem = { id?: string; seriesId?: number; vintage?: number | 'latest'; frequency?: string; start?: string; values?: unknown[]; transform?: string; method: string; params?: Record<string, unknown> };

/** Turns stored-series items into value arrays (a few queries for the whole batch). */
export async function resolveItems(db: Db, items: RawItem[]): Promise<(BatchItem | { id?: string; error: { code: string; message: string } })[]> {
  const stored = items.filter((i) => i.seriesId !== undefined).map((i) => ({ seriesId: i.seriesId!, vintage: i.vintage ?? ('latest' as const) }));
  const found = stored.length ? await manySeriesValues(db, stored) : new Map();
  return items.map((item) => {
    if (item.seriesId === undefined) return item as unknown as BatchItem;
    const data = found.get(`${item.seriesId}@${item.vintage ?? 'latest'}`);
    if (!data || data instanceof HttpError) return { id: item.id, error: { code: data?.code ?? 'not_found', message: data?.message ?? 'The series was not found.' } };
    return {
      id: item.id,
      frequency: data.series.frequency,
      start: data.start ?? undefined,
      values: data.values,
      transform: item.transform as BatchItem['transform'],
      method: item.method as BatchItem['method'],
      params: item.params,
      echo: { seriesId: item.seriesId, vintage: data.vintage.number },
    };
  });
}

