/**
 * The text alternatives of charts (server/schemas/chart-text.ts), read from the options the pages
 * draw (src/components/charts/options.ts): the data table, the summary, and the SVG's title and desc.
 */
import { describe, expect, it } from 'vitest';
import { chartData, chartSummary, svgWithText } from '../../server/schemas/chart-text.js';
import { fmt } from '../../src/components/charts/echarts.js';
import { composeFigure } from '../../server/schemas/charts/figure.js';
import { compareChart, cycleChart, gainChart, trendChart } from '../../src/components/charts/options.js';

const periods = ['2023-Q1', '2023-Q2', '2023-Q3', '2023-Q4', '2024-Q1', '2024-Q2', '2024-Q3', '2024-Q4'];
const cycle = [null, -0.5, 0.25, 1.5, 0.75, -0.25, -1.25, -0.5];
const f = (v: number) => fmt(v);

describe('chart text alternatives', () => {
  it('reads a cycle chart: rows, values, unit, turning points and the shaded end of sample', () => {
    const d = chartData(cycleChart({ periods, cycle, unit: '% of trend', shadeLast: 3, turningPoints: [{ index: 3, type: 'peak' }, { index: 6, type: 'trough' }] }));
    expect(d.rows).toEqual(periods);
    expect(d.lines).toEqual([{ name: 'cycle', values: cycle }]);
    expect(d.unit).toBe('% of trend');
    expect(d.turningPoints).toEqual([{ period: '2023-Q4', type: 'peak' }, { period: '2024-Q3', type: 'trough' }]);
    expect(d.marks).toEqual(['2024-Q2 to 2024-Q4 shaded: end of sample: will be revised']);
    expect(chartSummary(d, f)).toBe(
      '7 periods from 2023-Q2 to 2024-Q4. Latest value (cycle): -0.500 % of trend, 2024-Q4. Last turning point: a trough in 2024-Q3 (2 marked). 2024-Q2 to 2024-Q4 shaded: end of sample: will be revised.',
    );
  });

  it('names every contraction of a chronology, not only the first, which alone is labelled on the chart', () => {
    const d = chartData(cycleChart({ periods, cycle, unit: '% of trend', contractions: { name: 'Invented chronology', ranges: [{ from: 1, to: 2 }, { from: 5, to: 6 }] } }));
    expect(d.marks).toEqual(['2023-Q2 to 2023-Q3 shaded: Invented chronology', '2024-Q2 to 2024-Q3 shaded: Invented chronology']);
  });

  it('names each line’s latest value and its period when lines end apart', () => {
    const d = chartData(
      compareChart({
        unit: '% of trend',
        zeroLine: true,
        lines: [
          { name: 'Hodrick–Prescott', periods, values: [1, 2, 3, 4, 5, 6, 7, 8] },
          { name: 'Hamilton', periods: periods.slice(0, 6), values: [1, 2, 3, 4, 5, -6] },
        ],
      }),
    );
    expect(d.lines.map((l) => l.name)).toEqual(['Hodrick–Prescott', 'Hamilton']);
    expect(d.lines[1].values).toEqual([1, 2, 3, 4, 5, -6, null, null]);
    expect(chartSummary(d, f)).toBe('8 periods from 2023-Q1 to 2024-Q4. Latest values (% of trend): Hodrick–Prescott 8.00 in 2024-Q4; Hamilton -6.00 in 2024-Q2.');
  });

  it('reads a forecast extension and the trend chart’s two lines', () => {
    const d = chartData(trendChart({ periods, input: [1, 2, 3, 4, 5, 6, null, null], trend: [1, 2, 3, 4, 5, 6, 7, 8], unit: 'index', extension: { from: 6, periods: 2, label: 'forecast' } }));
    expect(d.lines.map((l) => l.name)).toEqual(['observed', 'trend']);
    expect(d.marks).toEqual(['2024-Q3 to 2024-Q4 shaded: forecast']);
    expect(chartSummary(d, f)).toMatch(/^8 periods from 2023-Q1 to 2024-Q4\. Latest values \(index\): observed 6\.00 in 2024-Q2; trend 8\.00 in 2024-Q4\. 2024-Q3 to 2024-Q4 shaded: forecast\.$/);
  });

  it('reads a value axis (the gain curve) as x values, with its marked cut-off', () => {
    const d = chartData(gainChart({ periods: [2, 4, 40, 100], gain: [1, 0.99, 0.5, 0.02], cutoff: 39.7, word: 'quarters' }));
    expect(d.x).toBe('period (quarters)');
    expect(d.rows).toEqual(['2', '4', '40', '100']);
    expect(d.lines[0].values).toEqual([1, 0.99, 0.5, 0.02]);
    expect(chartSummary(d, f)).toContain('Marked: cut-off 39.7 quarters.');
    // Periods along the axis in the charts' own number format, not as 17 digits.
    const long = chartData(gainChart({ periods: [2, 119.09065622071837], gain: [1, 0.01], cutoff: 39.7, word: 'quarters' }));
    expect(chartSummary(long, f)).toMatch(/^period \(quarters\) from 2\.00 to 119\.1\. /);
    expect(chartSummary(long, f)).not.toContain('119.0906562');
  });

  it('says so when a chart has no values', () => {
    expect(chartSummary(chartData(cycleChart({ periods, cycle: periods.map(() => null) })), f)).toBe('The chart has no values.');
  });

  it('puts an escaped title and desc first in the SVG root', () => {
    const { option } = composeFigure(cycleChart({ periods, cycle }), { number: null, title: 'Gap <A & B>', subtitle: null, notes: null, source: 'Source: "us"', stamp: 'data as of 2025-01-30, vintage 1', caution: 'Caution.', institution: null, chronology: null });
    expect((option.title as { text: string }).text).toBe('Gap <A & B>');
    const svg = svgWithText('<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg" width="10"><rect/></svg>', 'Gap <A & B>', 'Source: "us"');
    expect(svg).toBe('<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg" width="10"><title>Gap &lt;A &amp; B&gt;</title><desc>Source: &quot;us&quot;</desc><rect/></svg>');
  });
});
