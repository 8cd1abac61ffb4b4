/** ECharts with only the parts Tidegauge draws, registered once (canvas for screens, SVG for files). */
import * as echarts from 'echarts/core';
import { BarChart, HeatmapChart, LineChart, ScatterChart } from 'echarts/charts';
import {
  DataZoomComponent,
  GraphicComponent,
  GridComponent,
  LegendComponent,
  MarkAreaComponent,
  MarkLineComponent,
  MarkPointComponent,
  TitleComponent,
  TooltipComponent,
  VisualMapComponent,
} from 'echarts/components';
import { CanvasRenderer, SVGRenderer } from 'echarts/renderers';
import { PALETTE } from '@schemas/palette';

echarts.use([
  LineChart,
  BarChart,
  ScatterChart,
  HeatmapChart,
  GridComponent,
  TooltipComponent,
  LegendComponent,
  DataZoomComponent,
  MarkLineComponent,
  MarkAreaComponent,
  MarkPointComponent,
  TitleComponent,
  GraphicComponent,
  VisualMapComponent,
  CanvasRenderer,
  SVGRenderer,
]);

export { echarts };

/** The palette of DESIGN.md (server/schemas/palette.ts): bars above zero keep DESIGN.md's ochre. */
export const COLORS = {
  paper: PALETTE.paper.DEFAULT,
  ink: PALETTE.ink.DEFAULT,
  inkSoft: PALETTE.ink.soft,
  hairline: PALETTE.hairline.DEFAULT,
  trend: PALETTE.trend.DEFAULT,
  above: PALETTE.above.bar,
  below: PALETTE.below.DEFAULT,
  alert: PALETTE.alert.DEFAULT,
};

/** Sequential violet ramp for vintages: oldest lightest, newest darkest. */
export function vintageColor(index: number, count: number): string {
  const ramp = ['#D9CFEF', '#BBA8E0', '#9A80CE', '#7A5DB8', '#5B3F9E', '#3F2680', '#2A1560'];
  if (count <= 1) return ramp[5];
  // From a visible light violet (ramp[1]) for the oldest to the darkest for the newest.
  return ramp[1 + Math.round((index / (count - 1)) * (ramp.length - 2))];
}

/** Categorical colours for comparisons of methods or series (distinct from the trend teal). */
export const COMPARE_COLORS = ['#1E2430', '#B7791F', '#0E6E68', '#7A5DB8', '#A23B2A', '#4A5A70', '#6B8E23', '#C05A8A'];

export const FONT = '"Source Sans 3", system-ui, sans-serif';
export const HEADING_FONT = 'Merriweather, Georgia, serif';

export function baseOption(): echarts.EChartsCoreOption {
  return {
    backgroundColor: 'transparent',
    textStyle: { fontFamily: FONT, color: COLORS.ink },
    animationDuration: 250,
    grid: { left: 56, right: 24, top: 44, bottom: 48, containLabel: false },
    tooltip: { trigger: 'axis', backgroundColor: '#FFFEFB', borderColor: COLORS.hairline, textStyle: { color: COLORS.ink, fontFamily: FONT }, valueFormatter: (v: unknown) => (typeof v === 'number' ? fmt(v) : String(v ?? '—')) },
    legend: { top: 0, right: 8, icon: 'roundRect', itemWidth: 14, itemHeight: 4, textStyle: { color: COLORS.inkSoft } },
  };
}

export const axisStyle = {
  axisLine: { lineStyle: { color: COLORS.hairline } },
  axisTick: { lineStyle: { color: COLORS.hairline } },
  axisLabel: { color: COLORS.inkSoft, fontFamily: FONT },
  splitLine: { lineStyle: { color: '#ECE8DD' } },
};

export function fmt(v: number, digits?: number): string {
  if (!Number.isFinite(v)) return '—';
  const a = Math.abs(v);
  const d = digits ?? (a >= 1000 ? 0 : a >= 100 ? 1 : a >= 1 ? 2 : 3);
  return v.toLocaleString('en-US', { minimumFractionDigits: d, maximumFractionDigits: d });
}
