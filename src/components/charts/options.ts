/** Chart options in Tidegauge's visual language (DESIGN.md), shared by every page. */
import { alignByPeriod } from '@schemas/align';
import { axisStyle, baseOption, COLORS, COMPARE_COLORS, fmt, FONT, HEADING_FONT, vintageColor } from './echarts';

type Num = number | null;

/** Axis ticks: thousands separated, no trailing zeros (1,250 · 0.5 · −2). */
export const axisFmt = (v: number) => Number(v.toPrecision(8)).toLocaleString('en-US', { maximumFractionDigits: 4 });

const xAxis = (periods: string[]) => ({ type: 'category', data: periods, boundaryGap: false, ...axisStyle, axisLabel: { ...axisStyle.axisLabel, hideOverlap: true } });
const yAxis = (name?: string, extra: Record<string, unknown> = {}) => ({
  type: 'value',
  scale: true,
  name,
  nameLocation: 'end',
  nameTextStyle: { color: COLORS.inkSoft, fontFamily: FONT, align: 'left' },
  ...axisStyle,
  axisLabel: { ...axisStyle.axisLabel, formatter: axisFmt },
  ...extra,
});
/** A line series in the house style: no symbols, the colour on the line and in the tooltip. */
const lineSeries = (name: string, data: Num[], color: string, width: number, more: Record<string, unknown> = {}) => ({
  name,
  type: 'line',
  data,
  showSymbol: false,
  lineStyle: { width, color, ...((more.lineStyle as object) ?? {}) },
  itemStyle: { color },
  ...Object.fromEntries(Object.entries(more).filter(([k]) => k !== 'lineStyle')),
});
const zoom = (n: number) => (n > 120 ? [{ type: 'inside', start: 0, end: 100 }, { type: 'slider', height: 18, bottom: 4, borderColor: COLORS.hairline }] : []);

/** The last `k` periods of a two-sided estimate, shaded: they rest on data that will be revised. */
export function endOfSampleArea(periods: string[], values: Num[], k: number) {
  let last = values.length - 1;
  while (last >= 0 && values[last] === null) last--;
  if (last < 0 || k <= 0) return undefined;
  const first = Math.max(0, last - k + 1);
  return {
    silent: true,
    itemStyle: { color: 'rgba(162,59,42,0.07)' },
    label: { show: true, position: 'insideTopRight', color: COLORS.alert, fontFamily: FONT, fontSize: 11, formatter: 'end of sample: will be revised' },
    // Category indices, not labels: exact on both bar and line charts.
    data: [[{ xAxis: first }, { xAxis: last }]],
  };
}

/** Periods a method added past the last observation (forecasts), shaded and labelled with the method's word. */
export interface ExtensionMark {
  from: number;
  periods: number;
  label: string;
}

/** The end-of-sample shading and the extension's, as one mark area. */
function markAreas(periods: string[], values: Num[], shadeLast: number | undefined, extension: ExtensionMark | undefined) {
  const end = shadeLast ? endOfSampleArea(periods, extension ? values.slice(0, extension.from) : values, shadeLast) : undefined;
  if (!extension) return end;
  const ext = [
    { xAxis: extension.from, itemStyle: { color: 'rgba(74,90,112,0.10)' }, label: { show: true, position: 'insideTop', color: COLORS.inkSoft, fontFamily: FONT, fontSize: 11, formatter: extension.label } },
    { xAxis: Math.min(periods.length - 1, extension.from + extension.periods - 1) },
  ];
  return { ...(end ?? { silent: true, itemStyle: { color: 'rgba(162,59,42,0.07)' } }), data: [...(end?.data ?? []), ext] };
}

/** A method's further series (bands) as thin dashed lines. */
const extraLines = (extra: NamedValues[] | undefined) =>
  (extra ?? []).map((e) => lineSeries(e.name, e.values, COLORS.inkSoft, 1, { lineStyle: { type: 'dashed' } }));

export interface NamedValues {
  name: string;
  values: Num[];
}

export function levelChart(opts: { periods: string[]; values: Num[]; name?: string; unit?: string }) {
  return {
    ...baseOption(),
    legend: { show: false },
    xAxis: xAxis(opts.periods),
    yAxis: yAxis(opts.unit),
    dataZoom: zoom(opts.periods.length),
    series: [lineSeries(opts.name ?? 'observed', opts.values, COLORS.ink, 1.25, { connectNulls: false })],
  };
}

export function trendChart(opts: { periods: string[]; input: Num[]; trend: Num[]; unit?: string; shadeLast?: number; title?: string; extra?: NamedValues[]; extension?: ExtensionMark }) {
  return {
    ...baseOption(),
    xAxis: xAxis(opts.periods),
    yAxis: yAxis(opts.unit),
    dataZoom: zoom(opts.periods.length),
    series: [
      lineSeries('observed', opts.input, COLORS.ink, 1),
      lineSeries('trend', opts.trend, COLORS.trend, 2, { markArea: markAreas(opts.periods, opts.trend, opts.shadeLast, opts.extension) }),
      ...extraLines(opts.extra),
    ],
  };
}

export interface TurningPointMark {
  index: number;
  type: 'peak' | 'trough';
}

export function cycleChart(opts: { periods: string[]; cycle: Num[]; unit?: string; turningPoints?: TurningPointMark[]; shadeLast?: number; extra?: NamedValues[]; extension?: ExtensionMark }) {
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
  return {
    ...baseOption(),
    legend: { show: false },
    xAxis: { ...xAxis(opts.periods), boundaryGap: true },
    yAxis: yAxis(opts.unit, { scale: false }),
    // No zoom on bar charts: with a zoom, ECharts draws a mark area a band short of the last bar.
    series: [
      {
        name: 'cycle',
        type: 'bar',
        data,
        barCategoryGap: '10%',
        markLine: { silent: true, symbol: 'none', lineStyle: { color: COLORS.ink, width: 1, type: 'solid' }, label: { show: false }, data: [{ yAxis: 0 }] },
        markPoint: marks.length ? { data: marks } : undefined,
        markArea: markAreas(opts.periods, opts.cycle, opts.shadeLast, opts.extension),
      },
      ...extraLines(opts.extra),
    ],
  };
}

export function gainChart(opts: { periods: number[]; gain: number[]; cutoff: number | null; band?: [number, number]; word: string }) {
  const marks: Record<string, unknown>[] = [];
  if (opts.cutoff) marks.push({ xAxis: opts.cutoff, label: { formatter: `cut-off ${fmt(opts.cutoff, 1)} ${opts.word}`, color: COLORS.trend, fontFamily: FONT } });
  if (opts.band) for (const b of opts.band) marks.push({ xAxis: b, label: { formatter: `${b}`, color: COLORS.inkSoft } });
  return {
    ...baseOption(),
    legend: { show: false },
    grid: { left: 48, right: 24, top: 32, bottom: 40 },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v, 3) },
    xAxis: { type: 'log', name: `period (${opts.word})`, nameLocation: 'middle', nameGap: 26, ...axisStyle, min: 2, max: Math.max(...opts.periods) },
    yAxis: { type: 'value', name: 'gain', min: 0, ...axisStyle },
    series: [
      { ...lineSeries('gain', [], COLORS.ink, 2), data: opts.periods.map((p, i) => [p, opts.gain[i]]), markLine: { silent: true, symbol: 'none', lineStyle: { type: 'dashed', color: COLORS.trend }, data: marks } },
    ],
  };
}

export interface NamedLine {
  name: string;
  periods: string[];
  values: Num[];
}

/** Aligns named lines on the union of their periods (server/schemas/align.ts). */
function alignLines(lines: NamedLine[]) {
  const { periods, values } = alignByPeriod(lines);
  return { periods, series: lines.map((l, k) => ({ name: l.name, values: values[k] })) };
}

export function vintagesChart(opts: { lines: NamedLine[]; unit?: string }) {
  const { periods, series } = alignLines(opts.lines);
  const n = series.length;
  return {
    ...baseOption(),
    grid: { left: 56, right: 84, top: 44, bottom: 48 },
    xAxis: xAxis(periods),
    yAxis: yAxis(opts.unit),
    dataZoom: zoom(periods.length),
    series: series.map((s, i) =>
      lineSeries(s.name, s.values, vintageColor(i, n), i === n - 1 ? 2 : 1.25, { endLabel: i === n - 1 ? { show: true, formatter: s.name, color: vintageColor(i, n), fontFamily: FONT, fontWeight: 600 } : undefined }),
    ),
  };
}

export function revisionBars(opts: { periods: string[]; revision: Num[]; unit?: string }) {
  return {
    ...baseOption(),
    legend: { show: false },
    xAxis: { ...xAxis(opts.periods), boundaryGap: true },
    yAxis: yAxis(opts.unit ? `revision (${opts.unit})` : 'revision', { scale: false }),
    dataZoom: zoom(opts.periods.length),
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

export function compareChart(opts: { lines: NamedLine[]; unit?: string; zeroLine?: boolean }) {
  const { periods, series } = alignLines(opts.lines);
  return {
    ...baseOption(),
    xAxis: xAxis(periods),
    yAxis: yAxis(opts.unit, { scale: !opts.zeroLine }),
    dataZoom: zoom(periods.length),
    series: series.map((s, i) =>
      lineSeries(s.name, s.values, COMPARE_COLORS[i % COMPARE_COLORS.length], i === 0 ? 2 : 1.5, {
        markLine: i === 0 && opts.zeroLine ? { silent: true, symbol: 'none', lineStyle: { color: COLORS.ink, width: 1 }, label: { show: false }, data: [{ yAxis: 0 }] } : undefined,
      }),
    ),
  };
}

/** Fan of gaps: each vintage's estimate (violet ramp), the final one, and the real-time end points. */
export function fanChart(opts: { lines: NamedLine[]; final: NamedLine; realTime: { period: string; value: number }[]; unit?: string }) {
  const { periods, series } = alignLines([...opts.lines, opts.final]);
  const n = opts.lines.length;
  const rt = new Map(opts.realTime.map((p) => [p.period, p.value]));
  return {
    ...baseOption(),
    xAxis: xAxis(periods),
    yAxis: yAxis(opts.unit, { scale: false }),
    dataZoom: zoom(periods.length),
    series: [
      ...series.slice(0, n).map((s, i) => lineSeries(s.name, s.values, vintageColor(i, n), 1)),
      lineSeries(opts.final.name, series[n].values, COLORS.ink, 2, { markLine: { silent: true, symbol: 'none', lineStyle: { color: COLORS.ink, width: 1 }, label: { show: false }, data: [{ yAxis: 0 }] } }),
      {
        name: 'real-time end points',
        type: 'scatter',
        symbolSize: 8,
        data: periods.map((p) => (rt.has(p) ? rt.get(p)! : null)),
        itemStyle: { color: COLORS.alert },
      },
    ],
  };
}

/** Adds the exhibit frame (title, subtitle, source, stamps, caution) to a chart, for files. */
export function withExhibitFrame(option: Record<string, any>, frame: { title: string; subtitle?: string | null; lines: string[] }) {
  const footer = frame.lines.filter(Boolean);
  return {
    ...option,
    backgroundColor: '#FFFFFF',
    title: {
      text: frame.title,
      subtext: frame.subtitle ?? '',
      left: 24,
      top: 16,
      textStyle: { fontFamily: HEADING_FONT, fontSize: 20, fontWeight: 'bold', color: COLORS.ink },
      subtextStyle: { fontFamily: FONT, fontSize: 13, color: COLORS.inkSoft },
    },
    legend: { ...(option.legend ?? {}), top: 70, left: 24 },
    grid: { left: 72, right: 40, top: 110, bottom: 40 + footer.length * 18 },
    dataZoom: [],
    graphic: footer.map((line, i) => ({
      type: 'text',
      left: 24,
      bottom: 12 + (footer.length - 1 - i) * 18,
      style: { text: line, fontFamily: FONT, fontSize: 11, fill: i === footer.length - 1 ? COLORS.alert : COLORS.inkSoft },
    })),
  };
}
