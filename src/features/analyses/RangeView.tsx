import { useMemo } from 'react';
import { RANGE_CAUTION } from '@schemas/cautions';
import { Chart } from '@/components/charts/Chart';
import { rangeChart } from '@/components/charts/options';
import { ErrorNote, Progress } from '@/components/ui';
import { useRange } from './api';

interface Props {
  seriesId: number;
  code: string;
  transform: 'none' | 'log' | 'log100';
  methods: { method: string; params: Record<string, unknown> }[];
}

/** The range of gap estimates across the chosen methods on the series' latest vintage. */
export function RangeView({ seriesId, code, transform, methods }: Props) {
  const range = useRange();
  const r = range.data;
  const option = useMemo(
    () => (r ? rangeChart({ periods: r.periods, unit: r.unitOfCycle, median: r.median, min: r.min, max: r.max, items: r.items.map((it) => ({ name: it.name, values: it.cycle })) }) : null),
    [r],
  );
  return (
    <div className="space-y-4">
      <button className="btn" disabled={methods.length < 2 || range.isPending} onClick={() => range.mutate({ seriesId, vintage: 'latest', transform, methods })}>
        {r ? 'Show the range again' : 'Show the range'}
      </button>
      {methods.length < 2 && <p className="text-sm text-ink-soft">Choose at least two methods.</p>}
      {range.isPending && <Progress value={null} label="Decomposing with each method" />}
      <ErrorNote error={range.error} />
      {r && option && (
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
          <ul className="list-disc pl-5 text-sm text-ink-soft">
            {r.items.map((it) => (
              <li key={it.method}>
                {it.methodLine}
                {it.twoSided ? ' (two-sided: its end will be revised)' : ''}
              </li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}
