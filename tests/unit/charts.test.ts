/**
 * Chart options as printed (issue 14): every SVG parses as XML and names the shipped fonts; the
 * end-of-sample band covers exactly its first and last period on every chart kind; time axes tick
 * on year boundaries; the latest observation is marked; levels are on the series' scale; the
 * vintage ramp's steps can be told apart; end labels stay inside the chart.
 * Charts are drawn by ECharts' server-side SVG renderer (server/lib/figure-svg.ts).
 */
import { SaxesParser } from 'saxes';
import { describe, expect, it } from 'vitest';
import { chartSvg, withChart } from '../../server/lib/figure-svg.js';
import { LATEST_ROOM, yearStep, yearTicks, zoom } from '../../server/schemas/charts/axes.js';
import { exhibitFigure } from '../../server/schemas/charts/figure.js';
import { compareChart, cycleChart, revisionBars, trendChart, vintagesChart } from '../../server/schemas/charts/options.js';
import { COLORS, vintageColor } from '../../server/schemas/charts/palette.js';
import type { Snapshot } from '../../server/schemas/exhibits.js';

const quarters = (from: number, to: number) => Array.from({ length: (to - from + 1) * 4 }, (_, i) => `${from + Math.floor(i / 4)}-Q${(i % 4) + 1}`);
const periods = quarters(2000, 2024); // 100 quarters, the last 2024-Q4
const cycle = periods.map((_, i) => Number((2 * Math.sin(i / 5)).toFixed(3)));
const level = periods.map((_, i) => 1000 * Math.exp(0.005 * i + 0.01 * Math.sin(i / 5)));
const log100 = level.map((v) => 100 * Math.log(v));

function snapshot(chartKind: Snapshot['chartKind']): Snapshot {
  const lines: Snapshot['lines'] =
    chartKind === 'compare'
      ? [
          { label: 'GDP · Hodrick–Prescott', role: 'cycle', periods, values: cycle },
          { label: 'GDP · Hamilton', role: 'cycle', periods, values: cycle.map((v) => v / 2) },
        ]
      : [
          { label: 'input', role: 'input', periods, values: log100 },
          { label: 'trend', role: 'trend', periods, values: log100.map((v, i) => v - cycle[i]) },
          { label: 'cycle', role: 'cycle', periods, values: cycle },
        ];
  return {
    schema: 1,
    kind: 'study',
    chartKind,
    text: { title: 'Output gap "estimates" & <revisions>', subtitle: 'Real GDP', units: '% of trend', sourceLine: 'Statistics office', notes: null },
    series: [{ id: 1, code: 'GDP', title: 'Real GDP', unit: 'index 2015 = 100', source: 'Statistics office' }],
    lines,
    studies: [{ id: 1, title: 't', method: 'hp', params: { lambda: 1600 }, transform: 'log100', vintage: 3, asOf: '2025-01-30', vintageChecksum: '', methodLine: 'Hodrick–Prescott, λ = 1 600' }],
    turningPoints: [],
    endOfSamplePeriods: 8,
    methodLine: 'Hodrick–Prescott, λ = 1 600',
    vintageStamp: 'data as of 2025-01-30, vintage 3',
    caution: 'Caution: end-of-sample estimates are revised.',
    software: { name: 'Tidegauge', version: 'test' },
    frozenAt: null,
    transform: 'log100',
  };
}

function parsesAsXml(svg: string) {
  const parser = new SaxesParser({ xmlns: true });
  let error: Error | null = null;
  parser.on('error', (e) => {
    error ??= e;
  });
  parser.write(svg).close();
  return error;
}

const KINDS: [string, object][] = [
  ['cycle bars', cycleChart({ periods, cycle, unit: '% of trend', shadeLast: 8 })],
  ['trend lines', trendChart({ periods, input: log100, trend: log100, transform: 'log100', unit: 'index', shadeLast: 8 })],
  ['comparison', compareChart({ lines: [{ name: 'a', periods, values: cycle }], unit: '% of trend', zeroLine: true, shadeLast: 8 })],
  ['vintages', vintagesChart({ lines: [{ name: 'vintage 1 (2024-11-02)', periods: periods.slice(0, 96), values: cycle.slice(0, 96) }, { name: 'vintage 2 (2025-01-30)', periods, values: cycle }], shadeLast: 8 })],
  ['revision bars', revisionBars({ periods, revision: cycle })],
  ['exhibit (cycle)', exhibitFigure(snapshot('cycle')).option],
  ['exhibit (trend)', exhibitFigure(snapshot('trend')).option],
  ['exhibit (comparison)', exhibitFigure(snapshot('compare')).option],
];

describe('SVG files (defect 1)', () => {
  it.each(KINDS)('%s: the SVG parses as XML and names only the shipped fonts', (_name, option) => {
    const svg = chartSvg(option, 1000, 600);
    expect(parsesAsXml(svg)).toBeNull();
    const families = new Set([...svg.matchAll(/font-family:([^;"]+)/g)].map((m) => m[1].split(',')[0].replace(/'/g, '').trim()));
    expect([...families].every((f) => f === 'Source Sans 3' || f === 'Merriweather')).toBe(true);
    expect(families.has('Source Sans 3')).toBe(true);
  });

  it('a title with quotes, ampersands and angle brackets stays well-formed', () => {
    const fig = exhibitFigure(snapshot('cycle'));
    const svg = chartSvg(fig.option, fig.width, fig.height);
    expect(parsesAsXml(svg)).toBeNull();
    expect(svg).toContain('Output gap &quot;estimates&quot; &amp; &lt;revisions&gt;');
  });
});

/** The x-range (px) of the shaded polygons of `color`, and the x of each category. */
function bandAndAxis(option: object, color: string) {
  return withChart(option, 1000, 600, (chart: any) => {
    const bands: [number, number][] = [];
    chart.getZr().storage.getDisplayList().forEach((el: any) => {
      if (el.shape?.points && el.style?.fill === color) {
        const xs = el.shape.points.map((p: number[]) => p[0]);
        bands.push([Math.min(...xs), Math.max(...xs)]);
      }
    });
    const xs = periods.map((_, i) => chart.convertToPixel({ xAxisIndex: 0 }, i) as number);
    const axis = chart.getModel().getComponent('xAxis', 0).axis;
    return { bands, x: (i: number) => xs[i], bandWidth: axis.getBandWidth() as number, bars: axis.onBand as boolean };
  });
}

describe('the end-of-sample band (defect 2)', () => {
  const shaded = KINDS.filter(([name]) => name !== 'revision bars');
  it.each(shaded)('%s: covers exactly the last 8 periods, 2023-Q1 to 2024-Q4', (_name, option) => {
    const { bands, x, bandWidth, bars } = bandAndAxis(option, COLORS.endBand);
    expect(bands).toHaveLength(1);
    const [left, right] = bands[0];
    const first = periods.indexOf('2023-Q1');
    const last = periods.indexOf('2024-Q4');
    // Bars: from the left edge of the first shaded bar to the right edge of the last; lines: point to point.
    const half = bars ? bandWidth / 2 : 0;
    expect(left).toBeCloseTo(x(first) - half, 0);
    expect(right).toBeCloseTo(x(last) + half, 0);
  });

  it('a forecast extension is shaded apart from the observed end of sample', () => {
    const values = [...cycle.slice(0, 96), null, null, null, null];
    const { bands, x, bandWidth } = bandAndAxis(cycleChart({ periods, cycle: values, shadeLast: 8, extension: { from: 96, periods: 4, label: 'forecast extension' } }), COLORS.endBand);
    expect(bands[0][0]).toBeCloseTo(x(88) - bandWidth / 2, 0);
    expect(bands[0][1]).toBeCloseTo(x(95) + bandWidth / 2, 0);
  });
});

describe('time axes with ticks on year boundaries', () => {
  it('steps of 1, 2, 5 or 10 years by span', () => {
    expect([8, 15, 25, 65, 120].map((y) => yearStep(y))).toEqual([1, 2, 5, 10, 20]);
  });

  it('ticks sit on first quarters and first months of years on a multiple of the step', () => {
    expect(yearTicks(periods).map((i) => periods[i])).toEqual(['2000-Q1', '2005-Q1', '2010-Q1', '2015-Q1', '2020-Q1']);
    const months = Array.from({ length: 15 * 12 }, (_, i) => `${2010 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}`);
    expect(yearTicks(months).map((i) => months[i])).toEqual(['2010-01', '2012-01', '2014-01', '2016-01', '2018-01', '2020-01', '2022-01', '2024-01']);
    const years = Array.from({ length: 65 }, (_, i) => String(1960 + i));
    expect(yearTicks(years).map((i) => years[i])).toEqual(['1960', '1970', '1980', '1990', '2000', '2010', '2020']);
  });

  it.each(KINDS)('%s: the axis labels are those years, in the drawn SVG', (_name, option) => {
    const svg = chartSvg(option, 1000, 600);
    const labels = [...svg.matchAll(/>((?:19|20)\d\d)<\/text>/g)].map((m) => m[1]);
    expect(labels).toEqual(['2000', '2005', '2010', '2015', '2020']);
  });
});

describe('publication details', () => {
  it('marks and labels the latest observation right of the plot, clear of the data and inside the picture', () => {
    for (const option of [cycleChart({ periods, cycle }), compareChart({ lines: [{ name: 'a', periods, values: cycle }] })]) {
      const svg = chartSvg(option, 1000, 600);
      const at = (text: string) => Number(svg.match(new RegExp(`translate\\(([\\d.]+) [\\d.-]+\\)"[^>]*>${text}</text>`))?.[1]);
      const x = at('2024-Q4');
      expect(at(cycle[99].toFixed(2))).toBe(x);
      // The plot ends LATEST_ROOM px from the right; the label starts past the last period's
      // position and its seven characters (about 6 px each at 11 px) end inside the picture.
      expect(x).toBeGreaterThan(1000 - LATEST_ROOM - 10);
      expect(x + 7 * 6).toBeLessThan(1000);
    }
  });

  it('draws levels on the series’ own scale when the data were logged for the decomposition', () => {
    const o = trendChart({ periods, input: log100, trend: log100, transform: 'log100', unit: 'index 2015 = 100' }) as any;
    expect(o.series[0].data[10]).toBeCloseTo(level[10], 8);
    expect(o.yAxis.name).toBe('index 2015 = 100');
  });

  it('the zoom control is drawn in our palette', () => {
    const long = quarters(1960, 2024);
    const svg = chartSvg(trendChart({ periods: long, input: long.map(() => 1), trend: long.map(() => 1) }), 1000, 600);
    expect((zoom(long.length)[1] as { fillerColor: string }).fillerColor).toBe('rgba(14,110,104,0.08)');
    expect(svg).toMatch(/fill="rgba?\(14,110,104/);
  });

  it('the vintage ramp has steps a reader can tell apart (at least 8 points of lightness up to 7 vintages)', () => {
    const lightness = (hex: string) => {
      const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255);
      return ((Math.max(r, g, b) + Math.min(r, g, b)) / 2) * 100;
    };
    for (let n = 2; n <= 7; n++) {
      const ls = Array.from({ length: n }, (_, i) => lightness(vintageColor(i, n)));
      for (let i = 1; i < n; i++) expect(ls[i - 1] - ls[i]).toBeGreaterThanOrEqual(8);
    }
    const many = Array.from({ length: 40 }, (_, i) => vintageColor(i, 40));
    expect(new Set(many).size).toBe(40);
  });

  it('keeps the newest vintage’s end label inside the chart', () => {
    const name = 'vintage 12';
    const option = vintagesChart({ lines: [{ name: 'vintage 11 (2024-11-02)', periods, values: cycle }, { name: 'vintage 12 (2025-01-30)', periods, values: cycle }] });
    const right = withChart(option, 600, 300, (chart: any) => {
      let edge = -Infinity;
      chart.getZr().storage.getDisplayList().forEach((el: any) => {
        if (el.style?.text === name) {
          const box = el.getBoundingRect().clone();
          if (el.getComputedTransform()) box.applyTransform(el.getComputedTransform());
          edge = Math.max(edge, box.x + box.width);
        }
      });
      return edge;
    });
    expect(right).toBeGreaterThan(400);
    expect(right).toBeLessThanOrEqual(600);
  });
});
