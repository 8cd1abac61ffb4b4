import ReactEChartsCore from 'echarts-for-react/esm/core';
import { forwardRef, useImperativeHandle, useRef } from 'react';
import { echarts } from './echarts';

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

/** A chart on the page (canvas). `label` describes it for screen readers. */
export const Chart = forwardRef<ChartHandle, Props>(function Chart({ option, height = 320, testId, label, onEvents }, ref) {
  const inner = useRef<ReactEChartsCore>(null);
  useImperativeHandle(ref, () => ({ instance: () => inner.current?.getEchartsInstance() }));
  return (
    <div role="img" aria-label={label} data-testid={testId}>
      <ReactEChartsCore ref={inner} echarts={echarts} option={option} notMerge lazyUpdate style={{ height, width: '100%' }} opts={{ renderer: 'canvas' }} onEvents={onEvents} />
    </div>
  );
});
