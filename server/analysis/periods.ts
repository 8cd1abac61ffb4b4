/**
 * Periods in the SDMX TIME_PERIOD forms: annual `2024`, quarterly `2024-Q1`, monthly `2024-01`.
 * Internally a period is an integer index: year·s + (sub-period − 1), s periods a year.
 */
import { PERIODS_PER_YEAR, type Frequency } from '../schemas/frequency.js';

const PATTERNS: Record<Frequency, RegExp> = {
  A: /^(\d{4})$/,
  Q: /^(\d{4})-Q([1-4])$/,
  M: /^(\d{4})-(0[1-9]|1[0-2])$/,
};

/** The frequency a canonical period string is written in, or null. */
export function frequencyOf(period: string): Frequency | null {
  for (const f of ['A', 'Q', 'M'] as Frequency[]) if (PATTERNS[f].test(period)) return f;
  return null;
}

/** Index of a canonical period string of the given frequency, or null when it is not one. */
export function periodIndex(period: string, frequency: Frequency): number | null {
  const m = PATTERNS[frequency].exec(period);
  if (!m) return null;
  const year = Number(m[1]);
  if (year < 1000 || year > 2999) return null;
  const sub = frequency === 'A' ? 1 : Number(m[2]);
  return year * PERIODS_PER_YEAR[frequency] + sub - 1;
}

export function formatPeriod(index: number, frequency: Frequency): string {
  const s = PERIODS_PER_YEAR[frequency];
  const year = Math.floor(index / s);
  const sub = index - year * s + 1;
  if (frequency === 'A') return String(year);
  if (frequency === 'Q') return `${year}-Q${sub}`;
  return `${year}-${String(sub).padStart(2, '0')}`;
}

/** n consecutive periods from `start`. */
export function periodRange(start: string, n: number, frequency: Frequency): string[] {
  const i0 = periodIndex(start, frequency);
  if (i0 === null) throw new RangeError(`"${start}" is not a ${frequency} period`);
  const out = new Array<string>(n);
  for (let i = 0; i < n; i++) out[i] = formatPeriod(i0 + i, frequency);
  return out;
}

export interface LoosePeriod {
  period: string;
  /** Set when the input was not already canonical (for example `2024Q1` or `2024-01-01`). */
  rewritten?: boolean;
}

/**
 * Reads a period as people write it in files: the canonical forms, `2024Q1`, `2024 Q1`, `2024M01`,
 * `2024-1`, and an ISO 8601 date that is the first day of a period (`2024-04-01` for 2024-Q2).
 * Returns the canonical string, or an error message naming the form expected.
 */
export function readPeriod(raw: string, frequency: Frequency): LoosePeriod | { error: string } {
  const text = raw.trim();
  if (!text) return { error: 'The period is empty.' };
  if (text.length > 32) return { error: 'The period is too long to be a period.' };
  if (periodIndex(text, frequency) !== null) return { period: text };
  const expected = frequency === 'A' ? '2024' : frequency === 'Q' ? '2024-Q1' : '2024-01';
  let m: RegExpExecArray | null;
  if (frequency === 'Q' && (m = /^(\d{4})[\s-]?[Qq]([1-4])$/.exec(text))) return { period: `${m[1]}-Q${m[2]}`, rewritten: true };
  if (frequency === 'M' && (m = /^(\d{4})(?:[Mm]|-)(\d{1,2})$/.exec(text))) {
    const month = Number(m[2]);
    if (month >= 1 && month <= 12) return { period: `${m[1]}-${String(month).padStart(2, '0')}`, rewritten: true };
  }
  if ((m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text))) {
    const month = Number(m[2]);
    const day = Number(m[3]);
    if (day === 1 && month >= 1 && month <= 12) {
      if (frequency === 'M') return { period: `${m[1]}-${m[2]}`, rewritten: true };
      if (frequency === 'Q' && (month - 1) % 3 === 0) return { period: `${m[1]}-Q${(month - 1) / 3 + 1}`, rewritten: true };
      if (frequency === 'A' && month === 1) return { period: m[1], rewritten: true };
    }
    return { error: `The date ${text} is not the first day of a ${frequency === 'A' ? 'year' : frequency === 'Q' ? 'quarter' : 'month'}; write the period as ${expected}.` };
  }
  const other = frequencyOf(text);
  if (other) return { error: `${text} is a ${other === 'A' ? 'annual' : other === 'Q' ? 'quarterly' : 'monthly'} period, but the series is ${frequency === 'A' ? 'annual' : frequency === 'Q' ? 'quarterly' : 'monthly'}; write it as ${expected}.` };
  return { error: `"${text.slice(0, 20)}" is not a period; write it as ${expected}.` };
}
