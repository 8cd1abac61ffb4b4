/**
 * The exhibit as a figure: one home for its composition, used by the exhibit page's chart, the
 * client's PNG and SVG files, and the server's PDF and publication pack. The figure carries what
 * the page does: number ("Chart 3"), title, subtitle with units, the chart, notes, the source line
 * in the institution's wording, the vintage and method lines, the caution and the institution.
 */
import { contractionRanges } from '../chronology.js';
import type { Snapshot } from '../exhibits.js';
import { compareChart, cycleChart, trendChart } from './options.js';
import { bandSeries, rangeChart } from './range.js';
import { COLORS, FONT, HEADING_FONT } from './palette.js';

/** The chart of an exhibit, drawn only from its snapshot (or a draft's live content). */
export function exhibitChart(s: Snapshot) {
  const line = (role: string) => s.lines.find((l) => l.role === role);
  const periodsOf = s.chartKind === 'compare' ? [...new Set(s.lines.flatMap((l) => l.periods))].sort() : (line('cycle') ?? s.lines[0]).periods;
  const contractions = s.chronology ? { name: s.chronology.name, ranges: contractionRanges(periodsOf, s.chronology) } : undefined;
  const units = s.text.units ?? undefined;
  if (s.chartKind === 'range' && s.range) {
    // The legend names each method (the lines' labels), the band and the median.
    return rangeChart({ periods: s.range.periods, unit: units, median: s.range.median, min: s.range.min, max: s.range.max, items: s.lines.map((l) => ({ name: l.label, values: l.values })), contractions });
  }
  if (s.chartKind === 'compare') {
    return compareChart({ zeroLine: true, unit: units, contractions, shadeLast: s.endOfSamplePeriods, lines: s.lines.map((l) => ({ name: l.label, periods: l.periods, values: l.values })) });
  }
  const cycle = line('cycle')!;
  if (s.chartKind === 'trend') {
    const transform = s.transform ?? s.studies[0]?.transform;
    return trendChart({ periods: cycle.periods, input: line('input')!.values, trend: line('trend')!.values, transform, unit: transform && transform !== 'none' ? s.series[0]?.unit : units, shadeLast: s.endOfSamplePeriods, contractions });
  }
  const index = new Map(cycle.periods.map((p, i) => [p, i]));
  const chart = cycleChart({
    periods: cycle.periods,
    cycle: cycle.values,
    unit: units,
    shadeLast: s.endOfSamplePeriods,
    contractions,
    turningPoints: (s.turningPoints ?? []).filter((t) => index.has(t.period)).map((t) => ({ index: index.get(t.period)!, type: t.type })),
  });
  return s.revisionBand?.length ? withRevisionBand(chart, cycle.periods, s.revisionBand) : chart;
}

/**
 * The cycle chart with the band of past revisions at its last periods (the exhibit option), drawn
 * as the study page draws it (charts/range.ts) and named in the legend; its note is in the caution.
 */
function withRevisionBand(chart: ReturnType<typeof cycleChart>, periods: string[], band: NonNullable<Snapshot['revisionBand']>) {
  const at = new Map(band.map((b) => [b.period, b]));
  const lower = periods.map((p) => at.get(p)?.lower ?? null);
  const upper = periods.map((p) => at.get(p)?.upper ?? null);
  const name = 'band of past revisions (not a forecast)';
  const c = chart as Record<string, any>;
  return { ...c, legend: { ...(c.legend ?? {}), show: true, data: [{ name, icon: 'roundRect', itemStyle: { color: 'rgba(162,59,42,0.35)' } }] }, series: [...bandSeries(name, lower, upper, COLORS.alert, 'rgba(162,59,42,0.14)'), ...c.series] };
}

/** The default wording of the source line; `{sources}` stands for the exhibit's sources. */
export const DEFAULT_SOURCE_WORDING = 'Sources: {sources}; staff calculations.';

/** The source line in the institution's wording. */
export function sourceLine(wording: string, sources: string | null | undefined) {
  const list = (sources ?? '').trim().replace(/[.;]+$/, '');
  return (wording || DEFAULT_SOURCE_WORDING).replace('{sources}', list || 'see notes');
}

/** The text of the figure, in print order. */
export interface FigureText {
  number: string | null;
  title: string;
  subtitle: string | null;
  notes: string | null;
  source: string;
  stamp: string;
  caution: string;
  institution: string | null;
  chronology: string | null;
}

export function figureText(s: Snapshot, number?: string | null): FigureText {
  const pub = s.publication;
  const subtitle = [s.text.subtitle, s.text.units ? `(${s.text.units})` : ''].filter(Boolean).join(' ');
  return {
    number: number ?? pub?.number ?? null,
    title: s.text.title,
    subtitle: subtitle || null,
    notes: s.text.notes,
    source: pub?.sourceLine ?? sourceLine(DEFAULT_SOURCE_WORDING, s.text.sourceLine),
    stamp: `${s.vintageStamp} · ${s.methodLine}`,
    caution: s.caution,
    institution: pub?.institution || null,
    chronology: s.chronology ? `Shaded: contractions dated by the ${s.chronology.name} (${s.chronology.area}).` : null,
  };
}

/** Splits text into lines of at most about `width` px for a font of `size` px (average glyph width × `em`). */
export function wrapText(text: string, width: number, size: number, em = 0.5): string[] {
  const max = Math.max(10, Math.floor(width / (size * em)));
  const out: string[] = [];
  for (const para of text.split('\n')) {
    let line = '';
    for (const word of para.split(/\s+/).filter(Boolean)) {
      if (line && (line + ' ' + word).length > max) {
        out.push(line);
        line = word;
      } else line = line ? `${line} ${word}` : word;
    }
    out.push(line);
  }
  return out;
}

const PAD = 28;
const CHART_HEIGHT = 400;

/**
 * The framed exhibit as one chart option of `width` px, and the height it needs. Every piece of
 * text is laid out here as its own line, so the screen, the PNG, the SVG and the PDF agree.
 */
export function exhibitFigure(s: Snapshot, opts: { width?: number; number?: string | null } = {}) {
  return composeFigure(exhibitChart(s), figureText(s, opts.number), opts.width);
}

/** A chart framed with the text of a figure (exhibits, and study charts downloaded as files). */
export function composeFigure(chartOption: object, t: FigureText, width = 1200) {
  const inner = width - 2 * PAD;
  const chart = chartOption as Record<string, any>;
  const texts: Record<string, unknown>[] = [];
  let y = 22;
  // Header lines get ids starting "figure-head": an SVG's <title> and <desc> name them once (render.ts).
  const put = (lines: string[], size: number, style: Record<string, unknown>, lead: number, head = false) => {
    for (const l of lines) {
      texts.push({ type: 'text', ...(head ? { id: `figure-head-${texts.length}` } : {}), left: PAD, top: y, silent: true, style: { text: l, fontSize: size, fontFamily: FONT, fill: COLORS.inkSoft, ...style } });
      y += lead;
    }
  };
  if (t.number) put([t.number], 13, { fontWeight: 'bold', fill: COLORS.trend }, 20, true);
  put(wrapText(t.title, inner, 21, 0.58), 21, { fontFamily: HEADING_FONT, fontWeight: 'bold', fill: COLORS.ink }, 29, true);
  if (t.subtitle) put(wrapText(t.subtitle, inner, 14), 14, {}, 20, true);
  const legendTop = y + 6;
  const gridTop = legendTop + 40;
  y = gridTop + CHART_HEIGHT + 30;
  if (t.notes) put(wrapText(t.notes, inner, 12.5), 12.5, { fill: COLORS.ink }, 17);
  if (t.chronology) put(wrapText(t.chronology, inner, 11.5), 11.5, {}, 16);
  put(wrapText(t.source, inner, 11.5), 11.5, {}, 16);
  put(wrapText(t.stamp, inner, 11.5), 11.5, {}, 16);
  put(wrapText(t.caution, inner, 11.5), 11.5, { fill: COLORS.alert }, 16);
  if (t.institution) {
    y += 4;
    put([t.institution], 11.5, { fontWeight: 'bold', fill: COLORS.ink }, 16);
  }
  const height = y + 14;
  const option = {
    ...chart,
    animation: false,
    backgroundColor: '#FFFFFF',
    // Not drawn (the header lines above are): read for the SVG's <title> and <desc>.
    title: { show: false, text: [t.number, t.title].filter(Boolean).join(': '), subtext: t.subtitle ?? '' },
    legend: { ...(chart.legend ?? {}), top: legendTop, left: PAD, right: undefined },
    grid: { ...(chart.grid ?? {}), left: PAD + 44, right: Math.max(40, chart.grid?.right ?? 0), top: gridTop, bottom: height - gridTop - CHART_HEIGHT },
    dataZoom: [],
    graphic: texts,
  };
  return { option, width, height, text: t };
}
