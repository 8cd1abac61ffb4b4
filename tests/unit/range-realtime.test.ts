/**
 * The range across methods (server/analysis/range.ts) against numpy's nanmedian/nanmin/nanmax,
 * and the real-time reliability pieces (server/analysis/realtime.ts): numpy's linear quantile and
 * a constructed history whose revisions are known.
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { rangeAcross } from '../../server/analysis/range.js';
import { quantile, realtimeReliability, revisionBand, revisionSpread } from '../../server/analysis/realtime.js';
import { relativeError } from '../helpers/references.js';

const here = path.dirname(fileURLToPath(import.meta.url));
const R = JSON.parse(fs.readFileSync(path.join(here, '..', 'fixtures', 'methods-references.json'), 'utf8')).range;
const nan = (a: (number | null)[]) => Float64Array.from(a, (v) => (v === null ? NaN : v));

describe('range across methods — against numpy', () => {
  it('median, minimum and maximum of the values present (7 methods, gaps, one empty period)', () => {
    const r = rangeAcross(R.cycles.map(nan));
    expect(relativeError(r.median, R.median)).toBeLessThan(1e-15);
    expect(relativeError(r.min, R.min)).toBe(0);
    expect(relativeError(r.max, R.max)).toBe(0);
    expect(r.count[5]).toBe(0);
  });
  it('the linear quantile of numpy.quantile', () => {
    const sorted = Float64Array.from(R.quantiles.of as number[]).sort();
    R.quantiles.q.forEach((q: number, k: number) => expect(quantile(sorted, q)).toBeCloseTo(R.quantiles.values[k], 14));
  });
});

describe('real-time reliability on a constructed history', () => {
  // Final cycle sin(t/3); vintage v ends at period 20 + v and its estimates at distance d from its
  // end are off by e(d) = 0.5 − 0.1d (d < 5), exact elsewhere.
  const P = Array.from({ length: 40 }, (_, i) => `P${String(i).padStart(2, '0')}`);
  const finalCycle = Float64Array.from(P, (_, i) => Math.sin(i / 3));
  const error = (d: number) => (d < 5 ? 0.5 - 0.1 * d : 0);
  const vintages = Array.from({ length: 15 }, (_, v) => {
    const end = 20 + v;
    return { periods: P.slice(0, end + 1), cycle: Float64Array.from({ length: end + 1 }, (_, i) => finalCycle[i] + error(end - i)) };
  });
  const final = { periods: P, cycle: finalCycle };

  it('statistics of the end points: every revision is −0.5', () => {
    const s = realtimeReliability(vintages, final);
    expect(s.periods).toBe(15);
    expect(s.meanAbsoluteRevision).toBeCloseTo(0.5, 14);
    expect(s.noiseToSignal).toBeCloseTo(0, 12); // a constant revision has no spread
    expect(s.correlation).toBeCloseTo(1, 12);
    const rt = vintages.map((v) => v.cycle.at(-1)!);
    const fi = vintages.map((v) => finalCycle[v.periods.length - 1]);
    expect(s.signChangeShare).toBeCloseTo(rt.filter((x, i) => Math.sign(x) !== Math.sign(fi[i])).length / 15, 14);
  });

  it('the revision spread by distance is the known error, and the band moves the latest estimate by it', () => {
    const spread = revisionSpread(vintages, final, 8);
    for (const s of spread) {
      expect(s.count).toBe(15);
      expect(s.p05).toBeCloseTo(-error(s.distance), 12);
      expect(s.p95).toBeCloseTo(-error(s.distance), 12);
      expect(s.sd).toBeCloseTo(0, 12);
    }
    const band = revisionBand(final, spread);
    expect(band.map((b) => b.period)).toEqual(P.slice(32));
    expect(band.at(-1)!.lower).toBeCloseTo(finalCycle[39] - 0.5, 12);
  });
});

describe('the range chart', () => {
  it('its text alternative reads the band’s edges, the median and each method, never the filled difference', async () => {
    const { rangeChart } = await import('../../server/schemas/charts/range.js');
    const { chartData } = await import('../../server/schemas/chart-text.js');
    const d = chartData(rangeChart({ periods: ['2020-Q1', '2020-Q2'], unit: '% of trend', median: [0.5, -1], min: [-1, -2], max: [2, 0.5], items: [{ name: 'A', values: [-1, 0.5] }, { name: 'B', values: [2, -2] }] }));
    expect(d.lines.map((l) => l.name)).toEqual(['range across methods: lower edge', 'range across methods: upper edge', 'A', 'B', 'median']);
    expect(d.lines[0].values).toEqual([-1, -2]);
    expect(d.lines[1].values).toEqual([2, 0.5]);
    expect(d.unit).toBe('% of trend');
  });

  it('shades a chronology’s contractions underneath, labelled with its name, and its text alternative still reads only the lines', async () => {
    const { rangeChart } = await import('../../server/schemas/charts/range.js');
    const { chartData } = await import('../../server/schemas/chart-text.js');
    const { BAND_SERIES_ID } = await import('../../server/schemas/charts/axes.js');
    const lines = { periods: ['2020-Q1', '2020-Q2', '2020-Q3', '2020-Q4'], median: [0.5, -1, -2, 0], min: [-1, -2, -3, -1], max: [2, 0.5, -1, 1], items: [{ name: 'A', values: [-1, 0.5, -3, 1] }] };
    const plain = rangeChart(lines) as { series: { id?: string }[]; xAxis: unknown };
    expect(plain.series.some((x) => x.id === BAND_SERIES_ID)).toBe(false);
    const shaded = rangeChart({ ...lines, contractions: { name: 'Invented chronology', ranges: [{ from: 1, to: 2 }] } }) as { series: { id?: string }[] };
    const band = shaded.series.find((x) => x.id === BAND_SERIES_ID)!;
    expect(JSON.stringify(band)).toContain('Invented chronology');
    expect(chartData(shaded).lines.map((l) => l.name)).toEqual(chartData(plain).lines.map((l) => l.name));
  });
});
