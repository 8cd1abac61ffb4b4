/**
 * The reference chronology: an institution's own dated peaks and troughs of an economy or area,
 * the bodies of its routes, and the contractions (peak to trough) that charts shade from it.
 */
import { z } from 'zod';

/** A peak or trough at an SDMX period (`2008`, `2008-Q2`, `2008-05`). */
export const turnSchema = z.object({
  period: z.string().regex(/^\d{4}(-Q[1-4]|-(0[1-9]|1[0-2]))?$/, 'A period looks like 2008, 2008-Q2 or 2008-05.'),
  type: z.enum(['peak', 'trough'], { error: 'A turning point is a "peak" or a "trough".' }),
});
export type Turn = z.infer<typeof turnSchema>;

export const chronologySchema = z.object({
  name: z.string({ error: 'Give the chronology a name.' }).trim().min(1, 'Give the chronology a name.').max(120, 'A name has at most 120 characters.'),
  area: z.string({ error: 'Say which economy or area it dates.' }).trim().min(1, 'Say which economy or area it dates.').max(80, 'An area has at most 80 characters.'),
  notes: z.string().max(5000, 'Notes have at most 5000 characters.').optional(),
  turns: z.array(turnSchema).max(400, 'At most 400 turning points.').default([]),
});
export type ChronologyBody = z.infer<typeof chronologySchema>;
export const updateChronologySchema = chronologySchema.partial().refine((v) => Object.keys(v).length > 0, 'Send at least one field.');
export const fromSeriesSchema = z.object({ seriesId: z.number().int().positive(), vintage: z.union([z.number().int().positive(), z.literal('latest')]).default('latest') });

export interface Chronology {
  id: number;
  name: string;
  area: string;
  notes: string | null;
  turns: Turn[];
  updatedBy: { id: number; name: string } | null;
  updatedAt: string;
}

/** What an exhibit freezes of a chronology: its name and the contractions. */
export interface ChronologyStamp {
  id: number;
  name: string;
  area: string;
  contractions: { peak: string; trough: string | null }[];
}

/** The first and last month (counted from year 0) a period covers. */
export function monthSpan(period: string): [number, number] {
  const y = Number(period.slice(0, 4)) * 12;
  if (period.length === 4) return [y, y + 11];
  if (period[5] === 'Q') {
    const q = Number(period[6]) - 1;
    return [y + 3 * q, y + 3 * q + 2];
  }
  const m = Number(period.slice(5, 7)) - 1;
  return [y + m, y + m];
}

/** Sorts turns by time and checks that peaks and troughs alternate (what to fix, or null). */
export function checkTurns(turns: Turn[]): string | null {
  const sorted = [...turns].sort((a, b) => monthSpan(a.period)[0] - monthSpan(b.period)[0]);
  for (let i = 1; i < sorted.length; i++) {
    if (monthSpan(sorted[i].period)[0] === monthSpan(sorted[i - 1].period)[0]) return `Two turning points fall in the same period (${sorted[i].period}).`;
    if (sorted[i].type === sorted[i - 1].type) return `Peaks and troughs must alternate: ${sorted[i - 1].period} and ${sorted[i].period} are both ${sorted[i].type}s.`;
  }
  return null;
}

/** Contractions: each peak to the next trough (an open one when the last turn is a peak). */
export function contractions(turns: readonly Turn[]): ChronologyStamp['contractions'] {
  const sorted = [...turns].sort((a, b) => monthSpan(a.period)[0] - monthSpan(b.period)[0]);
  const out: ChronologyStamp['contractions'] = [];
  sorted.forEach((t, i) => {
    if (t.type !== 'peak') return;
    const next = sorted.slice(i + 1).find((x) => x.type === 'trough');
    out.push({ peak: t.period, trough: next?.period ?? null });
  });
  return out;
}

/**
 * The contractions on a chart's periods, as index ranges: every period that overlaps the months
 * from the peak to the trough (common practice: shade peak to trough inclusive).
 */
export function contractionRanges(periods: readonly string[], stamp: Pick<ChronologyStamp, 'contractions'>): { from: number; to: number }[] {
  if (!periods.length) return [];
  const spans = periods.map(monthSpan);
  const out: { from: number; to: number }[] = [];
  for (const c of stamp.contractions) {
    const start = monthSpan(c.peak)[0];
    const end = c.trough ? monthSpan(c.trough)[1] : Infinity;
    let from = -1;
    let to = -1;
    spans.forEach(([a, b], i) => {
      if (b >= start && a <= end) {
        if (from < 0) from = i;
        to = i;
      }
    });
    if (from >= 0) out.push({ from, to });
  }
  return out;
}
