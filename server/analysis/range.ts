/**
 * The range of gap estimates across methods: per period, the median, minimum and maximum of the
 * methods' cycles that have a value there (a period no method covers has none). A description of
 * the spread of estimates — not a confidence interval and not a forecast.
 *
 * Median: the middle value of the k values present, or the mean of the two middle ones when k is
 * even (numpy.median's definition).
 *
 * Example: rangeAcross([[1, NaN], [3, 2], [2, 5]]) → median [2, 3.5], min [1, 2], max [3, 5], count [3, 2].
 */
export interface RangeAcross {
  median: Float64Array;
  min: Float64Array;
  max: Float64Array;
  /** How many methods have a value at each period. */
  count: Int32Array;
}

export function rangeAcross(cycles: readonly ArrayLike<number>[]): RangeAcross {
  const n = cycles.reduce((m, c) => Math.max(m, c.length), 0);
  const median = new Float64Array(n).fill(NaN);
  const min = new Float64Array(n).fill(NaN);
  const max = new Float64Array(n).fill(NaN);
  const count = new Int32Array(n);
  const here = new Float64Array(cycles.length);
  for (let t = 0; t < n; t++) {
    let k = 0;
    for (const c of cycles) {
      const v = t < c.length ? c[t] : NaN;
      if (Number.isFinite(v)) here[k++] = v;
    }
    count[t] = k;
    if (k === 0) continue;
    const sorted = here.subarray(0, k).sort();
    min[t] = sorted[0];
    max[t] = sorted[k - 1];
    median[t] = k % 2 ? sorted[(k - 1) >> 1] : (sorted[k / 2 - 1] + sorted[k / 2]) / 2;
  }
  return { median, min, max, count };
}
