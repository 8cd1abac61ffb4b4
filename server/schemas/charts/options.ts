/**
 * Chart options in Tidegauge's visual language (DESIGN.md): one module for the screen, the PNG and
 * SVG files the client draws, and the PDF the server draws (ECharts' server-side SVG renderer).
 * Options are plain objects; nothing here needs a browser.
 */
import { alignByPeriod } from '../align.js';
import { bandLayer, endOfSampleBand, LATEST_ROOM, latestMark, lineSeries, timeAxis, valueAxis, zoom, type Num, type PeriodBand } from './axes.js';
import { axisFmt, COLORS, COMPARE_COLORS, fmt, FONT, vintageColor } from './palette.js';

export type { Num, PeriodBand };

export function baseOption() {
  return {
    backgroundColor: 'transparent',
    textStyle: { fontFamily: FONT, color: COLORS.ink },
    animationDuration: 250,
    grid: { left: 56, right: 24, top: 52, bottom: 48, containLabel: false },
    tooltip: { trigger: 'axis', backgroundColor: '#FFFEFB', borderColor: COLORS.hairline, textStyle: { color: COLORS.ink, fontFamily: FONT }, valueFormatter: (v: unknown) => (typeof v === 'number' ? fmt(v) : String(v ?? '—')) },
    // One row that pages on narrow charts, so it never runs into the plot or the band's label.
    legend: { type: 'scroll', top: 0, left: 56, right: 8, align: 'left', icon: 'roundRect', itemWidth: 14, itemHeight: 4, textStyle: { color: COLORS.inkSoft, lineHeight: 18 }, pageIconColor: COLORS.trend, pageIconInactiveColor: COLORS.hairline, pageTextStyle: { color: COLORS.inkSoft } },
  };
}

/** The base grid with room on the right for the latest observation's label. */
const latestGrid = () => ({ ...baseOption().grid, right: LATEST_ROOM });

/** Periods a method added past the last observation (forecasts), shaded and labelled with the method's word. */
export interface ExtensionMark {
  from: number;
  periods: number;
  label: string;
}

/** Contractions of a reference chronology on the chart's periods, labelled with its name. */
export interface ContractionMarks {
  name: string;
  ranges: { from: number; to: number }[];
}

export interface NamedValues {
  name: string;
  values: Num[];
}

/** Shared options of the time charts: shading and the chronology. */
interface Shading {
  shadeLast?: number;
  extension?: ExtensionMark;
  contractions?: ContractionMarks;
}

/** A chronology's contractions as shaded bands, the first labelled with the chronology's name. */
export function contractionBands(c: ContractionMarks | undefined): PeriodBand[] {
  return (c?.ranges ?? []).map((r, i) => ({ ...r, color: COLORS.contraction, label: i === 0 ? c!.name : undefined, name: c!.name, labelPosition: 'insideTopLeft' }));
}

/** The bands of a chart: contractions first (underneath), then the end of sample and the extension. */
function bandsOf(periods: string[], values: Num[], s: Shading): (PeriodBand | undefined)[] {
  const ext = s.extension;
  const observed = ext ? values.slice(0, ext.from) : values;
  return [
    ...contractionBands(s.contractions),
    endOfSampleBand(observed, s.shadeLast),
    ext ? { from: ext.from, to: Math.min(periods.length - 1, ext.from + ext.periods - 1), color: 'rgba(74,90,112,0.10)', label: ext.label, labelPosition: 'insideTop' } : undefined,
  ];
}

/** A chart on a time axis with its bands (bars need a hidden axis for them: see axes.ts). */
function timeChart(periods: string[], bars: boolean, bands: (PeriodBand | undefined)[], yAxis: object) {
  const layer = bandLayer(periods.length, bands, bars);
  const x = timeAxis(periods, { bars });
  return { xAxis: layer.axis ? [x, layer.axis] : x, yAxis, bandSeries: layer.series };
}

/** A method's further series (bands) as thin dashed lines. */
const extraLines = (extra: NamedValues[] | undefined) => (extra ?? []).map((e) => lineSeries(e.name, e.values, COLORS.inkSoft, 1, { lineStyle: { type: 'dashed' } }));

/** Levels shown on the series' own scale: a log transform is undone for the levels chart. */
export function toLevels(values: Num[], transform: string | undefined): Num[] {
  if (transform === 'log100') return values.map((v) => (v === null ? null : Math.exp(v / 100)));
  if (transform === 'log') return values.map((v) => (v === null ? null : Math.exp(v)));
  return values;
}

export function levelChart(opts: { periods: string[]; values: Num[]; name?: string; unit?: string }) {
  const t = timeChart(opts.periods, false, [], valueAxis(opts.unit));
  return {
    ...baseOption(),
    grid: latestGrid(),
    legend: { show: false },
    xAxis: t.xAxis,
    yAxis: t.yAxis,
    dataZoom: zoom(opts.periods.length),
    series: [lineSeries(opts.name ?? 'observed', opts.values, COLORS.ink, 1.25, { connectNulls: false, markPoint: latestMark(opts.periods, opts.values, COLORS.ink) })],
  };
}

/**
 * The series and its trend, on the series' own scale: with `transform` log or log100 the values
 * are turned back into levels (the unit is then the series' unit, not "100 × log").
 */
export function trendChart(opts: { periods: string[]; input: Num[]; trend: Num[]; unit?: string; transform?: string; extra?: NamedValues[] } & Shading) {
  const input = toLevels(opts.input, opts.transform);
  const trend = toLevels(opts.trend, opts.transform);
  const t = timeChart(opts.periods, false, bandsOf(opts.periods, trend, opts), valueAxis(opts.unit));
  return {
    ...baseOption(),
    grid: latestGrid(),
    xAxis: t.xAxis,
    yAxis: t.yAxis,
    dataZoom: zoom(opts.periods.length),
    series: [
      lineSeries('observed', input, COLORS.ink, 1, { markPoint: latestMark(opts.periods, input, COLORS.ink) }),
      lineSeries('trend', trend, COLORS.trend, 2),
      ...extraLines(opts.extra?.map((e) => ({ ...e, values: toLevels(e.values, opts.transform) }))),
      ...t.bandSeries,
    ],
  };
}

export interface TurningPointMark {
  index: number;
  type: 'peak' | 'trough';
}

export function cycleChart(opts: { periods: string[]; cycle: Num[]; unit?: string; turningPoints?: TurningPointMark[]; extra?: NamedValues[] } & Shading) {
  const data = opts.cycle.map((v) => (v === null ? null : { value: v, itemStyle: { color: v >= 0 ? COLORS.above : COLORS.below } }));
  const marks = (opts.turningPoints ?? []).map((tp) => ({
    name: tp.type,
    coord: [opts.periods[tp.index], opts.cycle[tp.index]],
    symbol: 'triangle',
    symbolSize: 9,
    symbolRotate: tp.type === 'peak' ? 0 : 180,
    symbolOffset: [0, tp.type === 'peak' ? -8 : 8],
    itemStyle: { color: COLORS.ink },
    label: { show: false },
  }));
  const latest = latestMark(opts.periods, opts.cycle, COLORS.ink);
  const t = timeChart(opts.periods, true, bandsOf(opts.periods, opts.cycle, opts), valueAxis(opts.unit, { scale: false }));
  return {
    ...baseOption(),
    grid: latestGrid(),
    legend: { show: false },
    xAxis: t.xAxis,
    yAxis: t.yAxis,
    // No zoom on bar charts: the bands lie on a hidden axis that a zoom would not move.
    series: [
      {
        name: 'cycle',
        type: 'bar',
        data,
        barCategoryGap: '10%',
        markLine: { silent: true, symbol: 'none', lineStyle: { color: COLORS.ink, width: 1, type: 'solid' }, label: { show: false }, data: [{ yAxis: 0 }] },
        markPoint: { data: [...marks, ...(latest ? latest.data.map((d) => ({ ...d, symbol: latest.symbol, symbolSize: latest.symbolSize, itemStyle: latest.itemStyle, label: latest.label })) : [])] },
      },
      ...extraLines(opts.extra),
      ...t.bandSeries,
    ],
  };
}

export function gainChart(opts: { periods: number[]; gain: number[]; cutoff: number | null; band?: [number, number]; word: string }) {
  const marks: Record<string, unknown>[] = [];
  if (opts.cutoff) marks.push({ xAxis: opts.cutoff, label: { formatter: `cut-off ${fmt(opts.cutoff, 1)} ${opts.word}`, color: COLORS.trend, fontFamily: FONT } });
  if (opts.band) for (const b of opts.band) marks.push({ xAxis: b, label: { formatter: `${b}`, color: COLORS.inkSoft } });
  const axis = { axisLine: { lineStyle: { color: COLORS.hairline } }, axisTick: { lineStyle: { color: COLORS.hairline } }, axisLabel: { color: COLORS.inkSoft, fontFamily: FONT, formatter: axisFmt }, splitLine: { lineStyle: { color: '#ECE8DD' } } };
  return {
    ...baseOption(),
    legend: { show: false },
    grid: { left: 48, right: 24, top: 32, bottom: 40 },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v, 3) },
    xAxis: { type: 'log', name: `period (${opts.word})`, nameLocation: 'middle', nameGap: 26, ...axis, min: 2, max: Math.max(...opts.periods) },
    yAxis: { type: 'value', name: 'gain', min: 0, ...axis },
    series: [{ ...lineSeries('gain', [], COLORS.ink, 2), data: opts.periods.map((p, i) => [p, opts.gain[i]]), markLine: { silent: true, symbol: 'none', lineStyle: { type: 'dashed', color: COLORS.trend }, data: marks } }],
  };
}

export interface NamedLine {
  name: string;
  periods: string[];
  values: Num[];
}

/** Aligns named lines on the union of their periods (server/schemas/align.ts). */
export function alignLines(lines: NamedLine[]) {
  const { periods, values } = alignByPeriod(lines);
  return { periods, series: lines.map((l, k) => ({ name: l.name, values: values[k] })) };
}

/** Room on the right for an end label of `text` (about 6.5 px a character at 12 px). */
const endRoom = (text: string) => Math.max(24, Math.ceil(text.length * 6.5) + 16);

export function vintagesChart(opts: { lines: NamedLine[]; unit?: string } & Shading) {
  const { periods, series } = alignLines(opts.lines);
  const n = series.length;
  // The end label names the newest vintage briefly ("vintage 4"); its release date is in the legend.
  const short = (name: string) => name.replace(/ \(.*\)$/, '');
  const newest = short(series[n - 1]?.name ?? '');
  const t = timeChart(periods, false, bandsOf(periods, series[n - 1]?.values ?? [], opts), valueAxis(opts.unit));
  return {
    ...baseOption(),
    grid: { left: 56, right: endRoom(newest), top: 44, bottom: 48 },
    xAxis: t.xAxis,
    yAxis: t.yAxis,
    dataZoom: zoom(periods.length),
    series: [
      ...series.map((s, i) => lineSeries(s.name, s.values, vintageColor(i, n), i === n - 1 ? 2 : 1.25, { endLabel: i === n - 1 ? { show: true, formatter: short(s.name), color: vintageColor(i, n), fontFamily: FONT, fontWeight: 600 } : undefined })),
      ...t.bandSeries,
    ],
  };
}

export function revisionBars(opts: { periods: string[]; revision: Num[]; unit?: string }) {
  const t = timeChart(opts.periods, true, [], valueAxis(opts.unit ? `revision (${opts.unit})` : 'revision', { scale: false }));
  return {
    ...baseOption(),
    legend: { show: false },
    xAxis: t.xAxis,
    yAxis: t.yAxis,
    series: [
      {
        name: 'revision',
        type: 'bar',
        data: opts.revision.map((v) => (v === null ? null : { value: v, itemStyle: { color: v >= 0 ? COLORS.above : COLORS.below } })),
        markLine: { silent: true, symbol: 'none', lineStyle: { color: COLORS.ink }, label: { show: false }, data: [{ yAxis: 0 }] },
      },
    ],
  };
}

/** Several lines on one time axis (cycles of methods or series); the end-of-sample band follows the first line. */
export function compareChart(opts: { lines: NamedLine[]; unit?: string; zeroLine?: boolean } & Shading) {
  const { periods, series } = alignLines(opts.lines);
  const t = timeChart(periods, false, bandsOf(periods, series[0]?.values ?? [], opts), valueAxis(opts.unit, { scale: !opts.zeroLine }));
  return {
    ...baseOption(),
    grid: latestGrid(),
    xAxis: t.xAxis,
    yAxis: t.yAxis,
    dataZoom: zoom(periods.length),
    series: [
      ...series.map((s, i) =>
        lineSeries(s.name, s.values, COMPARE_COLORS[i % COMPARE_COLORS.length], i === 0 ? 2 : 1.5, {
          markLine: i === 0 && opts.zeroLine ? { silent: true, symbol: 'none', lineStyle: { color: COLORS.ink, width: 1, type: 'solid' }, label: { show: false }, data: [{ yAxis: 0 }] } : undefined,
          markPoint: i === 0 ? latestMark(periods, s.values, COMPARE_COLORS[0]) : undefined,
        }),
      ),
      ...t.bandSeries,
    ],
  };
}

/** Fan of gaps: each vintage's estimate (violet ramp), the final one, and the real-time end points. */
export function fanChart(opts: { lines: NamedLine[]; final: NamedLine; realTime: { period: string; value: number }[]; unit?: string }) {
  const { periods, series } = alignLines([...opts.lines, opts.final]);
  const n = opts.lines.length;
  const rt = new Map(opts.realTime.map((p) => [p.period, p.value]));
  return {
    ...baseOption(),
    xAxis: timeAxis(periods),
    yAxis: valueAxis(opts.unit, { scale: false }),
    dataZoom: zoom(periods.length),
    series: [
      ...series.slice(0, n).map((s, i) => lineSeries(s.name, s.values, vintageColor(i, n), 1)),
      lineSeries(opts.final.name, series[n].values, COLORS.ink, 2, { markLine: { silent: true, symbol: 'none', lineStyle: { color: COLORS.ink, width: 1, type: 'solid' }, label: { show: false }, data: [{ yAxis: 0 }] } }),
      { name: 'real-time end points', type: 'scatter', symbolSize: 8, data: periods.map((p) => (rt.has(p) ? rt.get(p)! : null)), itemStyle: { color: COLORS.alert } },
    ],
  };
}
