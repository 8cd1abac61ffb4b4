/**
 * Charts drawn on the server: ECharts' server-side SVG renderer draws a chart option (the same
 * options module as the screen, server/schemas/charts) to an SVG string. Text is measured with the
 * shipped fonts' own metrics (fontkit), so labels are laid out as they will be printed.
 */
import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import * as echarts from 'echarts/core';
import { BarChart, LineChart, ScatterChart } from 'echarts/charts';
import { DataZoomComponent, GraphicComponent, GridComponent, LegendComponent, MarkAreaComponent, MarkLineComponent, MarkPointComponent, TitleComponent, TooltipComponent } from 'echarts/components';
import { SVGRenderer } from 'echarts/renderers';
import * as fontkit from 'fontkit';

echarts.use([DataZoomComponent, LineChart, BarChart, ScatterChart, GridComponent, LegendComponent, MarkLineComponent, MarkAreaComponent, MarkPointComponent, TitleComponent, TooltipComponent, GraphicComponent, SVGRenderer]);

const require = createRequire(import.meta.url);
const pkgDir = (name: string) => path.dirname(require.resolve(`${name}/package.json`));

/**
 * The fonts a figure is printed with: Source Sans 3 from Adobe's `source-sans` package (TrueType,
 * with Latin, Greek and Cyrillic in one file, so "λ = 1 600" needs no second font), Merriweather
 * from @fontsource (WOFF, Latin), which fontkit and PDFKit read as they are.
 */
export const FONT_FILES = {
  sans: () => path.join(pkgDir('source-sans'), 'TTF', 'SourceSans3-Regular.ttf'),
  sansBold: () => path.join(pkgDir('source-sans'), 'TTF', 'SourceSans3-Semibold.ttf'),
  serif: () => path.join(pkgDir('@fontsource/merriweather'), 'files', 'merriweather-latin-400-normal.woff'),
  serifBold: () => path.join(pkgDir('@fontsource/merriweather'), 'files', 'merriweather-latin-700-normal.woff'),
};
export type FontKey = keyof typeof FONT_FILES;

const loaded = new Map<FontKey, { font: fontkit.Font; bytes: Buffer }>();
export function fontFile(key: FontKey) {
  let f = loaded.get(key);
  if (!f) {
    const bytes = fs.readFileSync(FONT_FILES[key]());
    f = { font: fontkit.create(bytes) as fontkit.Font, bytes };
    loaded.set(key, f);
  }
  return f;
}

/** Which shipped font draws `text` in `family`: Merriweather where it has every glyph, else Source Sans 3. */
export function fontFor(family: string, bold: boolean, text = ''): FontKey {
  if (/merriweather/i.test(family)) {
    const key: FontKey = bold ? 'serifBold' : 'serif';
    const font = fontFile(key).font;
    if ([...text].every((c) => /\s/.test(c) || font.hasGlyphForCodePoint(c.codePointAt(0)!))) return key;
  }
  return bold ? 'sansBold' : 'sans';
}

/** Width of `text` in a CSS font shorthand ("bold 21px Merriweather, serif"); remembered, as charts measure the same labels often. */
const widths = new Map<string, number>();
function measure(text: string, css: string) {
  const key = `${css}\u0000${text}`;
  let width = widths.get(key);
  if (width === undefined) {
    const size = Number(/(\d+(?:\.\d+)?)px/.exec(css)?.[1] ?? 12);
    const bold = /\b(bold|[6-9]00)\b/.test(css);
    const { font } = fontFile(fontFor(css, bold, text));
    width = (font.layout(text).advanceWidth / font.unitsPerEm) * size;
    if (widths.size > 20_000) widths.clear();
    widths.set(key, width);
  }
  return { width };
}
echarts.setPlatformAPI({ measureText: measure });

/** A chart option drawn to an SVG document of `width` × `height` px. */
export function chartSvg(option: object, width: number, height: number): string {
  const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width, height });
  try {
    chart.setOption({ ...option, animation: false });
    return chart.renderToSVGString();
  } finally {
    chart.dispose();
  }
}

/** A rendered chart in memory, for tests that read where things were drawn. */
export function withChart<T>(option: object, width: number, height: number, use: (chart: echarts.ECharts) => T): T {
  const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width, height });
  try {
    chart.setOption({ ...option, animation: false });
    return use(chart as unknown as echarts.ECharts);
  } finally {
    chart.dispose();
  }
}
