/**
 * Renders a chart option to a file: SVG with ECharts' SVG renderer, PNG with its canvas renderer
 * at print resolution (pixelRatio 3). Fonts are the shipped ones, loaded before drawing.
 */
import { downloadBlob } from '@/lib/api';
import { chartData, chartSummary, svgWithText } from '@schemas/chart-text';
import { echarts, fmt } from './echarts';

async function withChart<T>(option: echarts.EChartsCoreOption, width: number, height: number, renderer: 'svg' | 'canvas', pixelRatio: number, use: (c: ReturnType<typeof echarts.init>) => T): Promise<T> {
  await document.fonts?.ready;
  const host = document.createElement('div');
  host.style.cssText = `position:fixed;left:-10000px;top:0;width:${width}px;height:${height}px;`;
  document.body.appendChild(host);
  const chart = echarts.init(host, undefined, { renderer, width, height, devicePixelRatio: pixelRatio });
  try {
    chart.setOption({ ...option, animation: false });
    return use(chart);
  } finally {
    chart.dispose();
    host.remove();
  }
}

export async function chartToSvg(option: echarts.EChartsCoreOption, width = 1000, height = 560): Promise<string> {
  const svg = await withChart(option, width, height, 'svg', 1, (c) => {
    const url = c.getDataURL({ type: 'svg' });
    return decodeURIComponent(url.slice(url.indexOf(',') + 1));
  });
  return svgWithText(svg, ...svgTitleAndDesc(option));
}

/** The file's `<title>` (the chart's title) and `<desc>` (its subtitle, the generated summary, and the source, stamp and caution lines). */
export function svgTitleAndDesc(option: echarts.EChartsCoreOption): [string, string] {
  const o = option as { title?: { text?: string; subtext?: string }; graphic?: { id?: string; style?: { text?: string } }[] };
  // A figure's header lines (number, title, subtitle) are already the title and subtext.
  const footer = (o.graphic ?? []).filter((g) => !g.id?.startsWith('figure-head')).map((g) => g.style?.text).filter((t): t is string => !!t);
  const sentence = (t: string) => (/[.!?]$/.test(t.trim()) ? t.trim() : `${t.trim()}.`);
  const desc = [o.title?.subtext, chartSummary(chartData(option), (v) => fmt(v)), ...footer].filter((t): t is string => !!t?.trim()).map(sentence).join(' ');
  return [o.title?.text || 'Chart', desc];
}

export async function chartToPngBlob(option: echarts.EChartsCoreOption, width = 1000, height = 560, pixelRatio = 3): Promise<Blob> {
  const dataUrl = await withChart(option, width, height, 'canvas', pixelRatio, (c) => c.getDataURL({ type: 'png', pixelRatio, backgroundColor: '#FFFFFF' }));
  // Decoded by hand: fetch() of a data: URL is refused by the Content-Security-Policy (connect-src).
  const bin = atob(dataUrl.slice(dataUrl.indexOf(',') + 1));
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return new Blob([bytes], { type: 'image/png' });
}

export async function downloadChart(option: echarts.EChartsCoreOption, filename: string, format: 'png' | 'svg', size = { width: 1000, height: 560 }) {
  if (format === 'svg') {
    const svg = await chartToSvg(option, size.width, size.height);
    downloadBlob(new Blob([svg], { type: 'image/svg+xml' }), `${filename}.svg`);
  } else {
    downloadBlob(await chartToPngBlob(option, size.width, size.height), `${filename}.png`);
  }
}
