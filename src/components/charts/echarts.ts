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

// The palette, fonts and number formats live with the chart options, shared with the server's PDF.
export { COLORS, COMPARE_COLORS, FONT, HEADING_FONT, fmt, vintageColor } from '@schemas/charts/palette';
export { baseOption } from '@schemas/charts/options';
export { axisStyle } from '@schemas/charts/axes';
