import ReactEChartsCore from 'echarts-for-react/esm/core';
import { forwardRef, useId, useImperativeHandle, useMemo, useRef, useState } from 'react';
import { chartData, chartSummary } from '@schemas/chart-text';
import { ScrollRegion } from '@/components/ScrollRegion';
import { echarts, fmt } from './echarts';
import { ChartTable } from './ChartTable';

export interface ChartHandle {
  instance(): unknown;
}

interface Props {
  option: echarts.EChartsCoreOption;
  height?: number;
  testId?: string;
  label: string;
  onEvents?: Record<string, (params: any) => void>;
}

/**
 * A chart on the page (canvas) with its text alternative: `label` names it, a summary generated from
 * the option (span, latest values, last turning point, shaded spans) describes it, and its data
 * open as a table under the "Data table" button.
 */
export const Chart = forwardRef<ChartHandle, Props>(function Chart({ option, height = 320, testId, label, onEvents }, ref) {
  const inner = useRef<ReactEChartsCore>(null);
  useImperativeHandle(ref, () => ({ instance: () => inner.current?.getEchartsInstance() }));
  const id = useId();
  const [open, setOpen] = useState(false);
  const data = useMemo(() => chartData(option), [option]);
  const summary = useMemo(() => chartSummary(data, (v) => fmt(v)), [data]);
  return (
    <div>
      <div role="img" aria-label={label} aria-describedby={`${id}-summary`} data-testid={testId}>
        <ReactEChartsCore ref={inner} echarts={echarts} option={option} notMerge lazyUpdate style={{ height, width: '100%' }} opts={{ renderer: 'canvas' }} onEvents={onEvents} />
      </div>
      <p id={`${id}-summary`} className="sr-only" data-testid={testId && `${testId}-summary`}>
        {summary}
      </p>
      <div className="flex justify-end">
        <button type="button" className="text-xs text-trend underline" aria-expanded={open} aria-controls={`${id}-table`} aria-label={`Data table: ${label}`} data-chart-table-toggle onClick={() => setOpen(!open)}>
          Data table
        </button>
      </div>
      <div id={`${id}-table`}>
        {open && (
          <ScrollRegion label={`Data of the chart: ${label}`} className="card mt-1 max-h-72 overflow-auto" testId={testId && `${testId}-table`}>
            <ChartTable data={data} caption={label} />
          </ScrollRegion>
        )}
      </div>
    </div>
  );
});
