/**
 * The small arithmetic of issue 14: values shown as loaded, revisions to the decimals they
 * compare, averaging into a lower frequency, contractions of a chronology on a chart's periods,
 * and what the end of the sample means for each method.
 */
import { describe, expect, it } from 'vitest';
import { aggregateByAverage } from '../../server/analysis/aggregate.js';
import { checkTurns, contractionRanges, contractions } from '../../server/schemas/chronology.js';
import { asLoaded, decimalsOf, revisionOf } from '../../server/schemas/numbers.js';
import { endOfSample } from '../../server/services/studies/results.js';

describe('numbers as loaded (defect 6)', () => {
  it('keeps the decimals the file gave', () => {
    expect([177.93, 178.7, 1200, 0.0125, 1e-7, 123456.789].map(decimalsOf)).toEqual([2, 1, 0, 4, 7, 3]);
    expect(asLoaded(177.93)).toBe('177.93');
    expect(asLoaded(1234.5)).toBe('1,234.5');
    expect(asLoaded(null)).toBe('—');
  });

  it('revisions add up: 177.99 → 178.7 is 0.71, not 0.7099999999999795', () => {
    expect(178.7 - 177.99).not.toBe(0.71);
    expect(revisionOf(177.99, 178.7)).toBe(0.71);
    expect(revisionOf(100, 100.125)).toBe(0.125);
  });
});

describe('averaging into a lower frequency (defect 3)', () => {
  it('averages complete quarters and leaves out incomplete ones at the ends', () => {
    const periods = ['2023-11', '2023-12', '2024-01', '2024-02', '2024-03', '2024-04', '2024-05', '2024-06', '2024-07', '2024-08', '2024-09', '2024-10'];
    const r = aggregateByAverage(periods, [9, 9, 1, 2, 6, 3, null, 5, 7, 8, 9, 4], 'M', 'Q');
    // 2023-Q4 and 2024-Q4 lack months: left out; 2024-Q2 lacks May: a gap inside.
    expect(r).toEqual({ periods: ['2024-Q1', '2024-Q2', '2024-Q3'], values: [3, null, 8] });
    expect(aggregateByAverage(['2024-Q1', '2024-Q2', '2024-Q3', '2024-Q4'], [1, 2, 3, 6], 'Q', 'A')).toEqual({ periods: ['2024'], values: [3] });
    expect(() => aggregateByAverage(['2024'], [1], 'A', 'Q')).toThrow(/cannot be turned into a higher frequency/);
  });
});

describe('the reference chronology on a chart', () => {
  const turns = [
    { period: '2008-05', type: 'peak' as const },
    { period: '2009-06', type: 'trough' as const },
    { period: '2020-02', type: 'peak' as const },
  ];
  it('shades each peak to its trough, and an open contraction to the end', () => {
    expect(contractions(turns)).toEqual([{ peak: '2008-05', trough: '2009-06' }, { peak: '2020-02', trough: null }]);
    const quarters = ['2008-Q1', '2008-Q2', '2008-Q3', '2008-Q4', '2009-Q1', '2009-Q2', '2009-Q3', '2020-Q1', '2020-Q2'];
    // Monthly dates on a quarterly chart: every quarter the months touch.
    expect(contractionRanges(quarters, { contractions: contractions(turns) })).toEqual([{ from: 1, to: 5 }, { from: 7, to: 8 }]);
  });
  it('says what to fix when peaks and troughs do not alternate', () => {
    expect(checkTurns([turns[0], { period: '2010-01', type: 'peak' }])).toMatch(/must alternate/);
    expect(checkTurns(turns)).toBeNull();
  });
});

describe('the end of the sample, by method (defect 5)', () => {
  const input = Float64Array.from({ length: 40 }, (_, i) => i);
  it('a two-sided filter with values to the end: the last two years will be revised', () => {
    expect(endOfSample(input, input, 'Q', true)).toEqual({ endOfSamplePeriods: 8, endNote: 'last 8 quarters (2 years): estimates will be revised' });
  });
  it('Baxter–King with K = 12: the periods it loses, not two years', () => {
    const cycle = input.map((v, i) => (i < 12 || i >= 28 ? NaN : v));
    expect(endOfSample(input, cycle, 'Q', true)).toEqual({ endOfSamplePeriods: 0, endNote: 'no estimate for the first 12 and the last 12 quarters: the filter needs 12 quarters on each side' });
  });
  it('a one-sided filter: nothing to say about the end', () => {
    expect(endOfSample(input, input, 'M', false)).toEqual({ endOfSamplePeriods: 0, endNote: null });
  });
});
