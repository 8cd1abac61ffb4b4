/**
 * Text alternatives of charts (WCAG 1.1.1): the data behind a chart option as a table, a short
 * summary a screen reader can speak (span, latest values, last turning point, what is shaded), and
 * the `<title>`/`<desc>` of an exported SVG. Read from the chart option itself (the ECharts option
 * objects of src/components/charts/options.ts), so that every chart gets its text without code of
 * its own; pure, so that the server can use it for files it renders.
 */

import { BAND_SERIES_ID } from './charts/axes.js';
type Num = number | null;
type Any = Record<string, any>;

export interface ChartData {
  /** What the rows are (the x axis's name, or "Period"). */
  x: string;
  rows: string[];
  lines: { name: string; values: Num[] }[];
  /** The y axis's name: the unit of the values. */
  unit: string | null;
  turningPoints: { period: string; type: 'peak' | 'trough' }[];
  /** Shaded spans (end of sample, forecasts) and marked positions (a cut-off), with their labels. */
  marks: string[];
}

const first = (v: unknown): Any => (Array.isArray(v) ? (v[0] ?? {}) : ((v as Any) ?? {}));
const numberOf = (v: unknown): Num => {
  const x = v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Any).value : v;
  return typeof x === 'number' && Number.isFinite(x) ? x : null;
};
const labelOf = (item: Any | undefined): string | null => {
  const f = item?.label?.formatter;
  return typeof f === 'string' && item?.label?.show !== false ? f : null;
};

/** The data of a chart option: rows (periods, or the x values of a value axis), one column per line. */
export function chartData(option: unknown): ChartData {
  const o = (option ?? {}) as Any;
  const xAxis = first(o.xAxis);
  const yAxis = first(o.yAxis);
  const all = (Array.isArray(o.series) ? o.series : [o.series]).filter((s: Any) => s && ['line', 'bar', 'scatter'].includes(s.type)) as Any[];
  // The shaded period bands are a series of their own (charts/axes.ts): read for its marks, not as a line.
  // The filled difference of a band (charts/range.ts) is drawing, not data: its edges are lines of their own.
  const series = all.filter((s) => s.id !== BAND_SERIES_ID && !String(s.id ?? '').startsWith('fill:'));
  const categorical = xAxis.type === 'category' || Array.isArray(xAxis.data);
  let rows: string[];
  let lines: ChartData['lines'];
  if (categorical) {
    rows = ((xAxis.data ?? []) as unknown[]).map(String);
    lines = series.map((s, k) => ({ name: String(s.name ?? `line ${k + 1}`), values: rows.map((_, i) => numberOf((s.data ?? [])[i])) }));
  } else {
    // A value or log axis: the points are [x, y] pairs.
    const xs = [...new Set(series.flatMap((s) => ((s.data ?? []) as unknown[][]).map((p) => p?.[0]).filter((x): x is number => typeof x === 'number')))].sort((a, b) => a - b);
    rows = xs.map(String);
    lines = series.map((s, k) => {
      const at = new Map(((s.data ?? []) as unknown[][]).map((p) => [p?.[0], numberOf(p?.[1])]));
      return { name: String(s.name ?? `line ${k + 1}`), values: xs.map((x) => at.get(x) ?? null) };
    });
  }
  const turningPoints: ChartData['turningPoints'] = [];
  const marks: string[] = [];
  // Bands over bars run from half a period before the first to half after the last (a hidden axis).
  const at = (v: unknown, edge: 'from' | 'to') => (typeof v === 'number' && categorical ? rows[edge === 'from' ? Math.ceil(v) : Math.floor(v)] : v === undefined ? undefined : String(v));
  for (const s of all) {
    for (const m of (s.markPoint?.data ?? []) as Any[]) {
      if ((m.name === 'peak' || m.name === 'trough') && Array.isArray(m.coord)) turningPoints.push({ period: String(m.coord[0]), type: m.name });
    }
    for (const area of (s.markArea?.data ?? []) as Any[][]) {
      const [a, b] = area ?? [];
      const text = labelOf(a) ?? (typeof a?.name === 'string' && a.name ? a.name : null) ?? labelOf(s.markArea);
      const from = at(a?.xAxis, 'from');
      const to = at(b?.xAxis, 'to');
      if (text && from !== undefined && to !== undefined) marks.push(`${from} to ${to} shaded: ${text}`);
    }
    for (const line of (s.markLine?.data ?? []) as Any[]) {
      const text = labelOf(line);
      if (text && line.xAxis !== undefined) marks.push(`marked: ${text}`);
    }
  }
  turningPoints.sort((a, b) => rows.indexOf(a.period) - rows.indexOf(b.period));
  return { x: categorical ? 'Period' : String(xAxis.name ?? 'x'), rows, lines, unit: typeof yAxis.name === 'string' && yAxis.name ? yAxis.name : null, turningPoints, marks };
}

const MAX_NAMED = 5;

/**
 * A few sentences on a chart: its span, the latest value of each line (up to five) with its period
 * and unit, the last turning point, and what it shades or marks. `format` writes numbers (the
 * client passes the charts' own formatter).
 */
export function chartSummary(d: ChartData, format: (v: number) => string): string {
  const withValue = d.rows.map((_, i) => d.lines.some((l) => l.values[i] !== null));
  const a = withValue.indexOf(true);
  const b = withValue.lastIndexOf(true);
  if (a < 0) return 'The chart has no values.';
  const unit = d.unit ? ` ${d.unit}` : '';
  // Values along a value axis (the gain curve's periods) are read as numbers, in the charts' format.
  const xText = (x: string) => (d.x !== 'Period' && Number.isFinite(Number(x)) && x.trim() !== '' ? format(Number(x)) : x);
  const span = d.x === 'Period' ? `${b - a + 1} periods from ${d.rows[a]} to ${d.rows[b]}.` : `${d.x} from ${xText(d.rows[a])} to ${xText(d.rows[b])}.`;
  const latest = d.lines.slice(0, MAX_NAMED).flatMap((l) => {
    let i = l.values.length - 1;
    while (i >= 0 && l.values[i] === null) i--;
    return i < 0 ? [] : [{ name: l.name, value: format(l.values[i]!), row: xText(d.rows[i]) }];
  });
  const sameRow = latest.every((x) => x.row === latest[0]?.row);
  let last = '';
  if (latest.length === 1) last = `Latest value (${latest[0].name}): ${latest[0].value}${unit}, ${latest[0].row}.`;
  else if (latest.length > 1 && sameRow) last = `Latest values, ${latest[0].row}${unit ? ` (${d.unit})` : ''}: ${latest.map((x) => `${x.name} ${x.value}`).join('; ')}.`;
  else if (latest.length > 1) last = `Latest values${unit ? ` (${d.unit})` : ''}: ${latest.map((x) => `${x.name} ${x.value} in ${x.row}`).join('; ')}.`;
  if (d.lines.length > MAX_NAMED) last += ` ${d.lines.length - MAX_NAMED} more lines in the table.`;
  const tp = d.turningPoints[d.turningPoints.length - 1];
  const turning = tp ? `Last turning point: a ${tp.type} in ${tp.period} (${d.turningPoints.length} marked).` : '';
  const marks = d.marks.length ? `${d.marks.map((m) => m[0].toUpperCase() + m.slice(1)).join('. ')}.` : '';
  return [span, last, turning, marks].filter(Boolean).join(' ');
}

const xml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** The SVG with a `<title>` and a `<desc>` as the first children of its root element (SVG 2, §5.4). */
export function svgWithText(svg: string, title: string, desc: string): string {
  const open = /<svg\b[^>]*>/.exec(svg);
  if (!open) return svg;
  const end = open.index + open[0].length;
  return `${svg.slice(0, end)}<title>${xml(title)}</title><desc>${xml(desc)}</desc>${svg.slice(end)}`;
}
