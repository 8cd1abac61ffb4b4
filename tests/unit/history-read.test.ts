/** Issue 12: how history tables' cells are read, and the fast revision summary of history loads. */
import { describe, expect, it } from 'vitest';
import { readPeriodCell, readReleaseLabel } from '../../server/importers/release-labels.js';
import { compareVintages, revisionSummaryOf } from '../../server/services/catalogue/revisions.js';

describe('release labels', () => {
  it('reads the usual spellings of a release: dates as themselves, periods as their first day', () => {
    const asOf = (t: string) => {
      const r = readReleaseLabel(t);
      return r.kind === 'none' ? null : [r.kind, r.asOf];
    };
    expect(['2000Q2', '2000q2', '2000-Q2', '2000:Q2', '2000 Q2'].map(asOf)).toEqual(Array(5).fill(['period', '2000-04-01']));
    expect(asOf('2000-05')).toEqual(['period', '2000-05-01']);
    expect(asOf('2000M5')).toEqual(['period', '2000-05-01']);
    expect(asOf('2000-05-25')).toEqual(['date', '2000-05-25']);
    expect(asOf('2000-05-25T00:00:00Z')).toEqual(['date', '2000-05-25']);
    expect(asOf('GDP 2000Q2')).toEqual(['period', '2000-04-01']);
    expect(asOf('2000-02-30')).toBeNull();
    expect(asOf('2000-13')).toBeNull();
    expect(asOf('release 1')).toBeNull();
  });

  it('reads a date in the period column as the period that contains it, by the frequency', () => {
    expect(readPeriodCell('2000-05-25', 'Q')).toEqual({ period: '2000-Q2', index: 2000 * 4 + 1 });
    expect(readPeriodCell('2000-12-31', 'M')).toEqual({ period: '2000-12', index: 2000 * 12 + 11 });
    expect(readPeriodCell('2000-07-01', 'A')).toEqual({ period: '2000', index: 2000 });
    expect(readPeriodCell('2000:Q3', 'Q')).toEqual({ period: '2000-Q3', index: 2000 * 4 + 2 });
    expect(readPeriodCell('2000q4', 'Q')).toEqual({ period: '2000-Q4', index: 2000 * 4 + 3 });
    expect('error' in readPeriodCell('Source: invented', 'Q')).toBe(true);
  });
});

describe('revisionSummaryOf', () => {
  it('equals the summary of compareVintages on lines with new, removed, missing and revised periods', () => {
    let seed = 7;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    for (let k = 0; k < 50; k++) {
      const line = (start: number, n: number) => {
        const periods: string[] = [];
        const values: (number | null)[] = [];
        for (let i = start; i < start + n; i++) {
          periods.push(`${2000 + Math.floor(i / 4)}-Q${(i % 4) + 1}`);
          values.push(rand() < 0.05 ? null : Math.round(1000 * (100 + i + (rand() < 0.5 ? rand() : 0))) / 1000);
        }
        return { periods, values };
      };
      const a = line(Math.floor(rand() * 4), 20 + Math.floor(rand() * 10));
      const b = line(Math.floor(rand() * 4), 20 + Math.floor(rand() * 10));
      const want = compareVintages(a, b).summary;
      const got = revisionSummaryOf(a, b);
      expect({ ...got, meanRevision: null, meanAbsoluteRevision: null, maxAbsoluteRevision: null }).toEqual({ ...want, meanRevision: null, meanAbsoluteRevision: null, maxAbsoluteRevision: null });
      for (const key of ['meanRevision', 'meanAbsoluteRevision', 'maxAbsoluteRevision'] as const) {
        if (want[key] === null) expect(got[key]).toBeNull();
        else expect(got[key]).toBeCloseTo(want[key]!, 10);
      }
    }
  });
});
