/**
 * A range of gap estimates across methods as the Range page and a range study show it: the chart
 * (a band from the lowest to the highest estimate, the median, each method thin, with its text
 * alternative), the caution that a range across methods is not a forecast, and the per-method table.
 */
import { useMemo } from 'react';
import { RANGE_CAUTION } from '@schemas/cautions';
import type { RangeResult } from '@schemas/analyses';
import { Chart } from '@/components/charts/Chart';
import { fmt } from '@/components/charts/echarts';
import { rangeChart } from '@/components/charts/options';

/** The last period at which a line has a value, and that value. */
function lastValue(periods: string[], values: (number | null)[]) {
  for (let i = values.length - 1; i >= 0; i--) if (values[i] !== null) return { period: periods[i], value: values[i] as number };
  return null;
}

export function RangeResultView({ r, code }: { r: RangeResult; code: string }) {
  const option = useMemo(
    () => rangeChart({ periods: r.periods, unit: r.unitOfCycle, median: r.median, min: r.min, max: r.max, items: r.items.map((it) => ({ name: it.name, values: it.cycle })) }),
    [r],
  );
  return (
    <div className="space-y-3" data-testid="range-result">
      <div className="card p-3">
        <h2 className="font-heading text-sm font-bold">
          {code}: the gap by {r.items.length} methods ({r.unitOfCycle}), vintage {r.vintage} of {r.asOf}
        </h2>
        <Chart testId="range-chart" label={`Range of gap estimates across ${r.items.length} methods for ${code}`} option={option} height={340} />
      </div>
      <p className="text-sm text-above" data-testid="range-caution">
        {RANGE_CAUTION}
      </p>
      <div className="overflow-x-auto">
        <table className="card w-full text-sm" data-testid="range-methods">
          <caption className="pb-1 text-left text-xs font-semibold uppercase tracking-wide text-ink-soft">The methods in the range ({r.unitOfCycle})</caption>
          <thead className="bg-paper-deep/60 text-xs text-ink-soft">
            <tr>
              <th className="px-2 py-1 text-left">Method and parameters</th>
              <th className="px-2 py-1 text-left">Uses future data</th>
              <th className="px-2 py-1 text-right">Last estimate</th>
              <th className="px-2 py-1 text-right">Lowest</th>
              <th className="px-2 py-1 text-right">Highest</th>
            </tr>
          </thead>
          <tbody>
            {r.items.map((it, k) => {
              const last = lastValue(r.periods, it.cycle);
              const present = it.cycle.filter((v): v is number => v !== null);
              return (
                <tr key={`${it.method}-${k}`} className="border-t border-hairline">
                  <th scope="row" className="px-2 py-1 text-left font-normal">
                    {it.methodLine}
                  </th>
                  <td className="px-2 py-1">{it.twoSided ? 'yes (two-sided: its end will be revised)' : 'no (one-sided)'}</td>
                  <td className="num px-2 py-1">{last ? `${fmt(last.value)} (${last.period})` : '—'}</td>
                  <td className="num px-2 py-1">{present.length ? fmt(Math.min(...present)) : '—'}</td>
                  <td className="num px-2 py-1">{present.length ? fmt(Math.max(...present)) : '—'}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </div>
  );
}
