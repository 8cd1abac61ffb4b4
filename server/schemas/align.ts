/**
 * Lines of (period, value) pairs put on one period axis: the union of their periods, sorted
 * (SDMX periods of one frequency sort as text). Shared by the server (revisions, comparisons,
 * exhibit downloads) and the client (charts of several lines). The one home of this step.
 *
 * Example: alignByPeriod([{ periods: ['2024-Q1', '2024-Q2'], values: [1, 2] }, { periods: ['2024-Q2'], values: [null] }])
 *   → { periods: ['2024-Q1', '2024-Q2'], values: [[1, 2], [null, null]], present: [[true, true], [false, true]] }
 */
export interface PeriodLine {
  periods: readonly string[];
  values: readonly (number | null)[];
}

export interface AlignedLines {
  periods: string[];
  /** values[k][i]: line k's value at periods[i], null when missing or absent. */
  values: (number | null)[][];
  /** present[k][i]: whether line k has a row for periods[i] (a stored null counts). */
  present: boolean[][];
}

export function alignByPeriod(lines: readonly PeriodLine[]): AlignedLines {
  const periods = [...new Set(lines.flatMap((l) => l.periods))].sort();
  const index = new Map(periods.map((p, i) => [p, i]));
  const values: (number | null)[][] = [];
  const present: boolean[][] = [];
  for (const line of lines) {
    const v = new Array<number | null>(periods.length).fill(null);
    const here = new Array<boolean>(periods.length).fill(false);
    line.periods.forEach((p, i) => {
      const at = index.get(p)!;
      v[at] = line.values[i] ?? null;
      here[at] = true;
    });
    values.push(v);
    present.push(here);
  }
  return { periods, values, present };
}
