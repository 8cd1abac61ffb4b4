/**
 * The invented series of the local fake SDMX source (development, tests and the demo only): the
 * statistics office of the invented Republic of Estuary. Every number is made up by a fixed
 * formula, so release r of a series is the same on every machine. Each release adds one period to
 * every series and revises the latest few values a little, as a real release would.
 */
import type { Frequency } from '../schemas/frequency.js';
import { formatPeriod, periodIndex } from '../analysis/periods.js';
import type { SdmxRef } from '../importers/sdmx-out.js';

export interface FakeSeriesSpec {
  /** Dimension values: FREQ, REF_AREA, INDICATOR. */
  key: [Frequency, string, string];
  title: string;
  unit: string;
  start: string;
  /** Periods in release 1. */
  length: number;
  level: number;
  /** Trend growth per period (log points). */
  growth: number;
  /** Cycle amplitude (log points) and period (in periods). */
  amplitude: number;
  cyclePeriods: number;
  seed: number;
}

export const FAKE_FLOW: SdmxRef = { agency: 'EST_STATS', id: 'NA_MAIN', version: '1.0' };
export const FAKE_STRUCTURE: SdmxRef = { agency: 'EST_STATS', id: 'DSD_NA_MAIN', version: '1.0' };
export const FAKE_DIMENSIONS = ['FREQ', 'REF_AREA', 'INDICATOR'];

export const FAKE_SERIES: FakeSeriesSpec[] = [
  { key: ['Q', 'EST', 'GDP_VOL'], title: 'Gross domestic product, volume index (invented)', unit: 'index 2015=100', start: '2005-Q1', length: 76, level: 82, growth: 0.0045, amplitude: 0.018, cyclePeriods: 30, seed: 11 },
  { key: ['Q', 'EST', 'HOURS'], title: 'Hours worked, total economy (invented)', unit: 'millions of hours', start: '2005-Q1', length: 76, level: 1210, growth: 0.0015, amplitude: 0.012, cyclePeriods: 30, seed: 23 },
  { key: ['M', 'EST', 'RETAIL_VOL'], title: 'Retail trade volume index (invented)', unit: 'index 2015=100', start: '2010-01', length: 168, level: 88, growth: 0.0012, amplitude: 0.02, cyclePeriods: 84, seed: 37 },
];

/** A number in [−1, 1) from integers, the same everywhere (a small integer hash). */
function noise(a: number, b: number, c: number): number {
  let h = (Math.imul(a, 374761393) + Math.imul(b, 668265263) + Math.imul(c, 2147483647)) | 0;
  h = Math.imul(h ^ (h >>> 13), 1274126177);
  h ^= h >>> 16;
  return ((h >>> 0) / 2 ** 32) * 2 - 1;
}

export const fakeKey = (s: FakeSeriesSpec) => s.key.join('.');

/** Release `release` (1, 2, …) of a series: periods and values rounded to one decimal. */
export function fakeRelease(s: FakeSeriesSpec, release: number): { periods: string[]; values: number[] } {
  const f = s.key[0];
  const i0 = periodIndex(s.start, f)!;
  const n = s.length + release - 1;
  const periods: string[] = [];
  const values: number[] = [];
  for (let t = 0; t < n; t++) {
    const truth = Math.log(s.level) + s.growth * t + s.amplitude * Math.sin((2 * Math.PI * t) / s.cyclePeriods) + 0.004 * noise(s.seed, t, 0);
    // The estimate of period t in this release: its error shrinks as later releases come in.
    const age = n - 1 - t;
    const error = 0.006 * Math.exp(-age / 2) * noise(s.seed, t, release);
    periods.push(formatPeriod(i0 + t, f));
    values.push(Math.round(Math.exp(truth + error) * 10) / 10);
  }
  return { periods, values };
}

