/** Database rows of the Catalogue turned into the shapes the API answers (server/schemas/catalogue.ts). */
import type { Series, Vintage } from '../../schemas/catalogue.js';

export const iso = (d: Date | string | null) => (d ? new Date(d).toISOString() : null);
export const dateOnly = (d: Date | string) => (d instanceof Date ? d.toISOString().slice(0, 10) : String(d).slice(0, 10));

export function toSeries(r: Record<string, any>): Series {
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

export function toVintage(r: Record<string, any>): Vintage {
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
