/**
 * The pieces every chart is made of: the time axis with ticks on year boundaries, the value axis,
 * lines in the house style, the zoom control in our palette, shaded period bands (end of sample,
 * forecast extension, contractions of a reference chronology) and the latest-observation marker.
 */
import { axisFmt, COLORS, fmt, FONT } from './palette.js';

export type Num = number | null;

export const axisStyle = {
  axisLine: { lineStyle: { color: COLORS.hairline } },
  axisTick: { lineStyle: { color: COLORS.hairline } },
  axisLabel: { color: COLORS.inkSoft, fontFamily: FONT },
  splitLine: { lineStyle: { color: '#ECE8DD' } },
};

/** The year of an SDMX period (`2024`, `2024-Q1`, `2024-01`). */
export const yearOf = (period: string) => Number(period.slice(0, 4));
/** Whether a period opens its year (annual periods always do). */
export const opensYear = (period: string) => period.length === 4 || period.endsWith('-Q1') || period.endsWith('-01');

/** Years between ticks: every year, or every 2, 5, 10, 20 or 50 years, so that at most `maxTicks` are labelled. */
export function yearStep(years: number, maxTicks = 10): number {
  for (const s of [1, 2, 5, 10, 20, 50]) if (Math.ceil(years / s) <= maxTicks) return s;
  return 100;
}

/** Indices of the periods where a tick and a year label go: year boundaries, years on a multiple of the step. */
export function yearTicks(periods: readonly string[], maxTicks = 10): number[] {
  if (!periods.length) return [];
  const years = yearOf(periods[periods.length - 1]) - yearOf(periods[0]) + 1;
  const step = yearStep(years, maxTicks);
  const out: number[] = [];
  periods.forEach((p, i) => {
    if (opensYear(p) && yearOf(p) % step === 0) out.push(i);
  });
  return out;
}

/**
 * A category axis of periods with ticks and labels on year boundaries (the label is the year).
 * On bar charts (`bars`) the tick sits on the boundary between December/Q4 and January/Q1.
 */
export function timeAxis(periods: readonly string[], opts: { bars?: boolean; maxTicks?: number } = {}) {
  const ticks = new Set(yearTicks(periods, opts.maxTicks));
  const at = (i: number) => ticks.has(i);
  return {
    type: 'category',
    data: periods,
    boundaryGap: !!opts.bars,
    ...axisStyle,
    axisTick: { ...axisStyle.axisTick, interval: at, alignWithLabel: false },
    axisLabel: { ...axisStyle.axisLabel, interval: at, hideOverlap: true, formatter: (v: string) => v.slice(0, 4) },
    splitLine: { show: false },
  };
}

export function valueAxis(name?: string, extra: Record<string, unknown> = {}) {
  return {
    type: 'value',
    scale: true,
    name,
    nameLocation: 'end',
    nameTextStyle: { color: COLORS.inkSoft, fontFamily: FONT, align: 'left' },
    ...axisStyle,
    axisLabel: { ...axisStyle.axisLabel, formatter: axisFmt },
    ...extra,
  };
}

/** A line series in the house style: no symbols, the colour on the line and in the tooltip. */
export const lineSeries = (name: string, data: Num[], color: string, width: number, more: Record<string, unknown> = {}) => ({
  name,
  type: 'line',
  data,
  showSymbol: false,
  lineStyle: { width, color, ...((more.lineStyle as object) ?? {}) },
  itemStyle: { color },
  ...Object.fromEntries(Object.entries(more).filter(([k]) => k !== 'lineStyle')),
});

/** The zoom control for long series, drawn in our palette rather than the library's default look. */
export const zoom = (n: number) =>
  n > 120
    ? [
        { type: 'inside', start: 0, end: 100 },
        {
          type: 'slider',
          height: 18,
          bottom: 4,
          borderColor: COLORS.hairline,
          backgroundColor: '#F3F0E8',
          fillerColor: 'rgba(14,110,104,0.08)',
          dataBackground: { lineStyle: { color: COLORS.inkSoft, width: 0.8 }, areaStyle: { color: 'rgba(75,82,99,0.10)' } },
          selectedDataBackground: { lineStyle: { color: COLORS.trend, width: 0.8 }, areaStyle: { color: 'rgba(14,110,104,0.10)' } },
          handleStyle: { color: COLORS.paper, borderColor: COLORS.trend, borderWidth: 1 },
          moveHandleStyle: { color: COLORS.hairline, opacity: 1 },
          emphasis: { handleStyle: { borderColor: COLORS.ink }, moveHandleStyle: { color: COLORS.ink, opacity: 0.6 } },
          textStyle: { color: COLORS.inkSoft, fontFamily: FONT, fontSize: 11 },
        },
      ]
    : [];

/** A shaded run of periods, by index (inclusive), with its colour and label. */
export interface PeriodBand {
  from: number;
  to: number;
  color: string;
  label?: string;
  labelColor?: string;
  /** Where the label goes inside the band. */
  labelPosition?: string;
  /** Lift the label just above the plot area, clear of the data and of the latest-observation label. */
  labelAbove?: boolean;
  /** What the band is, for the text alternative, when it shows no label of its own (the second contraction on). */
  name?: string;
}

/** The id of the series that carries a chart's shaded bands (chart-text.ts reads its marks, not its values). */
export const BAND_SERIES_ID = 'period-bands';

/** The last non-missing index of `values`, or −1. */
export function lastIndex(values: readonly Num[]): number {
  let last = values.length - 1;
  while (last >= 0 && (values[last] === null || values[last] === undefined)) last--;
  return last;
}

/** The last `k` periods that carry a value (an estimate that will be revised), or nothing. */
export function endOfSampleBand(values: readonly Num[], k: number | undefined): PeriodBand | undefined {
  const last = lastIndex(values);
  if (!k || k <= 0 || last < 0) return undefined;
  return { from: Math.max(0, last - k + 1), to: last, color: COLORS.endBand, label: 'end of sample: will be revised', labelColor: COLORS.alert, labelPosition: 'insideTopRight', labelAbove: true };
}

/**
 * Bands as a series of their own. On bar charts the band is laid on a hidden value axis running
 * from −0.5 to n − 0.5, so it covers whole bars: a mark area on the bar series itself is drawn
 * misplaced by the charting library (defect 2 of issue 14). On line charts it spans the points.
 * Returns the series and, for bars, the hidden axis to add as xAxis[1].
 */
export function bandLayer(n: number, bands: (PeriodBand | undefined)[], bars: boolean) {
  const list = bands.filter((b): b is PeriodBand => !!b && b.to >= b.from);
  if (!list.length) return { series: [] as Record<string, unknown>[], axis: null };
  const edge = bars ? 0.5 : 0;
  const series = {
    id: BAND_SERIES_ID,
    type: 'line',
    data: [],
    silent: true,
    // Above the bars, so a band's label is not hidden behind them; the shading is light enough to tint.
    z: 3,
    xAxisIndex: bars ? 1 : 0,
    markArea: {
      silent: true,
      data: list.map((b) => [
        {
          xAxis: b.from - edge,
          name: b.name ?? b.label,
          itemStyle: { color: b.color },
          label: b.label ? { show: true, position: b.labelPosition ?? 'insideTop', offset: b.labelAbove ? [0, -17] : [0, 0], color: b.labelColor ?? COLORS.inkSoft, fontFamily: FONT, fontSize: 11, formatter: b.label } : { show: false },
        },
        { xAxis: b.to + edge },
      ]),
    },
  };
  const axis = bars ? { type: 'value', show: false, min: -0.5, max: n - 0.5, position: 'top' } : null;
  return { series: [series], axis };
}

/** A marker and label on the latest observation ("2024-Q4: 1.2"), for the main line or bars. */
/** Room on the right of the plot for the latest observation's label (two short lines). */
export const LATEST_ROOM = 64;

export function latestMark(periods: readonly string[], values: readonly Num[], color: string) {
  const i = lastIndex(values);
  if (i < 0) return undefined;
  return {
    silent: true,
    symbol: 'circle',
    symbolSize: 7,
    itemStyle: { color, borderColor: '#FFFFFF', borderWidth: 1 },
    // Right of the point, in the room the chart keeps beyond the last period (LATEST_ROOM): no
    // bar, line or turning-point mark lies there, so the label never covers the data.
    label: { show: true, position: 'right', distance: 5, align: 'left', color: COLORS.ink, lineHeight: 13, fontFamily: FONT, fontSize: 11, fontWeight: 600, formatter: `${periods[i]}\n${fmt(values[i] as number)}` },
    data: [{ coord: [i, values[i]], name: 'latest' }],
  };
}
