/**
 * The range of gap estimates across methods as a chart: a band from the minimum to the maximum, the
 * median as a line, each method as a thin line, a legend naming them, and the zero line. The band
 * is a stacked pair (the minimum, then max − min filled above it, stacked whatever their signs:
 * `stackStrategy: 'all'`); the filler has an id starting
 * with `fill:` so that the text alternative (chart-text.ts) reads the minimum and maximum lines and
 * never the difference. The revision band uses the same drawing.
 */
import { alignByPeriod } from '../align.js';
import { bandLayer, lineSeries, timeAxis, valueAxis, zoom, type Num } from './axes.js';
import { baseOption, contractionBands, type ContractionMarks } from './options.js';
import { COLORS, COMPARE_COLORS } from './palette.js';

/** The filler series of a band: id prefix the text alternative skips. */
export const FILL_PREFIX = 'fill:';

/** A band between two lines (lower below upper), as a visible lower line, a filled difference and a visible upper line. */
export function bandSeries(name: string, lower: Num[], upper: Num[], color: string, fill: string) {
  const diff = lower.map((lo, i) => (lo === null || upper[i] === null ? null : (upper[i] as number) - lo));
  return [
    lineSeries(`${name}: lower edge`, lower, color, 1, { stack: name, stackStrategy: 'all', lineStyle: { type: 'dotted' }, z: 1 }),
    { id: `${FILL_PREFIX}${name}`, name, type: 'line', stack: name, stackStrategy: 'all', data: diff, showSymbol: false, silent: true, lineStyle: { width: 0 }, itemStyle: { color: fill }, areaStyle: { color: fill }, z: 0 },
    lineSeries(`${name}: upper edge`, upper, color, 1, { lineStyle: { type: 'dotted' }, z: 1 }),
  ];
}

export interface RangeLines {
  periods: string[];
  items: { name: string; values: Num[] }[];
  median: Num[];
  min: Num[];
  max: Num[];
  unit?: string;
  /** A reference chronology's contractions, shaded underneath. */
  contractions?: ContractionMarks;
}

export function rangeChart(r: RangeLines) {
  const zero = { silent: true, symbol: 'none', lineStyle: { color: COLORS.ink, width: 1, type: 'solid' }, label: { show: false }, data: [{ yAxis: 0 }] };
  const band = bandSeries('range across methods', r.min, r.max, COLORS.inkSoft, 'rgba(74,90,112,0.16)');
  const methodNames = r.items.map((it) => it.name);
  const shading = bandLayer(r.periods.length, contractionBands(r.contractions), false);
  return {
    ...baseOption(),
    legend: { ...baseOption().legend, data: ['range across methods', 'median', ...methodNames] },
    xAxis: shading.axis ? [timeAxis(r.periods), shading.axis] : timeAxis(r.periods),
    yAxis: valueAxis(r.unit, { scale: false }),
    dataZoom: zoom(r.periods.length),
    series: [
      ...band,
      ...r.items.map((it, i) => lineSeries(it.name, it.values, COMPARE_COLORS[(i + 1) % COMPARE_COLORS.length], 1, { lineStyle: { opacity: 0.8 } })),
      lineSeries('median', r.median, COLORS.ink, 2.5, { markLine: zero, z: 3 }),
      ...shading.series,
    ],
  };
}

/** The latest estimate with the band of past revisions at its last periods. */
export function revisionBandChart(opts: { periods: string[]; cycle: Num[]; band: { period: string; lower: Num; upper: Num }[]; name: string; unit?: string }) {
  const { periods, values } = alignByPeriod([
    { periods: opts.periods, values: opts.cycle },
    { periods: opts.band.map((b) => b.period), values: opts.band.map((b) => b.lower) },
    { periods: opts.band.map((b) => b.period), values: opts.band.map((b) => b.upper) },
  ]);
  return {
    ...baseOption(),
    legend: { ...baseOption().legend, data: [opts.name, 'band of past revisions'] },
    xAxis: timeAxis(periods),
    yAxis: valueAxis(opts.unit, { scale: false }),
    dataZoom: zoom(periods.length),
    series: [...bandSeries('band of past revisions', values[1], values[2], COLORS.alert, 'rgba(162,59,42,0.14)'), lineSeries(opts.name, values[0], COLORS.ink, 2)],
  };
}
