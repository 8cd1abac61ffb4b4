/**
 * How a history table's cells are read: a release's header or release date (a date, or a period
 * label in the usual spellings) and a period cell (an SDMX period, or a date that falls in it).
 */
import { formatPeriod, periodIndex, readPeriod } from '../analysis/periods.js';
import { PERIODS_PER_YEAR, type Frequency } from '../schemas/frequency.js';

export type LabelReading =
  | { kind: 'date'; asOf: string; readAs: string }
  | { kind: 'period'; asOf: string; readAs: string; period: string }
  | { kind: 'none'; error: string };

const pad = (n: number) => String(n).padStart(2, '0');

function realDate(y: number, m: number, d: number): string | null {
  if (y < 1000 || y > 2999 || m < 1 || m > 12 || d < 1 || d > 31) return null;
  const t = new Date(Date.UTC(y, m - 1, d));
  return t.getUTCMonth() === m - 1 ? `${y}-${pad(m)}-${pad(d)}` : null;
}

/**
 * A release label: `2000-05-25` (or a date cell, or `2000-05-25T…`) is that date; `2000Q2`,
 * `2000q2`, `2000-Q2`, `2000:Q2`, `2000 Q2` a quarter, `2000-05`, `2000M05`, `2000:05` a month and
 * `2000` a year, dated on their first day. A trailing label after a word (`GDP 2000Q2`) is read too.
 */
export function readReleaseLabel(raw: string): LabelReading {
  const text = String(raw ?? '').trim();
  if (!text) return { kind: 'none', error: 'The cell is empty.' };
  if (text.length > 60) return { kind: 'none', error: 'The cell is too long to be a date or a period.' };
  const one = readOne(text);
  if (one) return one;
  const last = /(?:^|[\s_])([0-9][0-9A-Za-z:\-]{3,})$/.exec(text)?.[1];
  const tail = last && last !== text ? readOne(last) : null;
  if (tail && tail.kind !== 'none') return { ...tail, readAs: `${tail.readAs} (from “${text.slice(0, 40)}”)` };
  return { kind: 'none', error: `“${text.slice(0, 30)}” is neither a date (2000-05-25) nor a period (2000Q2, 2000-05, 2000).` };
}

function readOne(text: string): LabelReading | null {
  let m: RegExpExecArray | null;
  if ((m = /^(\d{4})-(\d{2})-(\d{2})(?:[T ][\d:.]+Z?)?$/.exec(text))) {
    const d = realDate(+m[1], +m[2], +m[3]);
    return d ? { kind: 'date', asOf: d, readAs: `the date ${d}` } : { kind: 'none', error: `${text.slice(0, 20)} is not a real date.` };
  }
  if ((m = /^(\d{4})\s*[-:]?\s*[Qq]([1-4])$/.exec(text))) return periodLabel(`${m[1]}-Q${m[2]}`, +m[1], (+m[2] - 1) * 3 + 1);
  if ((m = /^(\d{4})\s*(?:[-:]|[-:]?[Mm])\s*(\d{1,2})$/.exec(text)) && +m[2] >= 1 && +m[2] <= 12) return periodLabel(`${m[1]}-${pad(+m[2])}`, +m[1], +m[2]);
  if ((m = /^(\d{4})$/.exec(text)) && +m[1] >= 1000) return periodLabel(m[1], +m[1], 1);
  return null;
}

function periodLabel(period: string, year: number, month: number): LabelReading {
  const asOf = `${year}-${pad(month)}-01`;
  return { kind: 'period', period, asOf, readAs: `the period ${period}, dated its first day ${asOf}` };
}

/**
 * A period cell of a history table for a series of `frequency`: an SDMX period in any of the
 * spellings loads accept (`2000Q2`, `2000:Q2`, …), or a date, which stands for the period that
 * contains it (2000-05-25 is 2000-Q2 in a quarterly series).
 */
export function readPeriodCell(raw: string, frequency: Frequency): { period: string; index: number } | { error: string } {
  const text = String(raw ?? '').trim().replace(/^(\d{4}):/, '$1-');
  const m = /^(\d{4})-(\d{2})-(\d{2})(?:[T ][\d:.]+Z?)?$/.exec(text);
  if (m && realDate(+m[1], +m[2], +m[3])) {
    const index = +m[1] * PERIODS_PER_YEAR[frequency] + Math.floor(((+m[2] - 1) * PERIODS_PER_YEAR[frequency]) / 12);
    return { period: formatPeriod(index, frequency), index };
  }
  const p = readPeriod(text, frequency);
  if ('error' in p) return { error: p.error };
  return { period: p.period, index: periodIndex(p.period, frequency)! };
}
