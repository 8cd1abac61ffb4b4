/**
 * Exhibits as vector PDF: each figure (server/schemas/charts/figure.ts, the same composition as the
 * screen and the PNG/SVG files) is drawn to SVG by ECharts' server-side renderer and placed on an
 * A4 landscape page by svg-to-pdfkit, with the shipped fonts embedded (PDFKit subsets them).
 */
import PDFDocument from 'pdfkit';
import SVGtoPDF from 'svg-to-pdfkit';
import { chartSvg, FONT_FILES, fontFile, fontFor, type FontKey } from '../../lib/figure-svg.js';
import { exhibitFigure } from '../../schemas/charts/figure.js';
import type { Snapshot } from '../../schemas/exhibits.js';

const A4_LANDSCAPE: [number, number] = [841.89, 595.28];
const MARGIN = 36;

const decode = (s: string) => s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');

/**
 * Prepares an SVG for PDFKit: each text element names the shipped font that has all its glyphs
 * (a title with "λ" falls back from Merriweather to Source Sans 3), and weights of 600 or more
 * read as bold.
 */
export function svgForPdf(svg: string): string {
  // The root's own width and height would override the viewport the page gives it: keep the viewBox only.
  const root = svg.replace(/^<svg width="[^"]*" height="[^"]*"/, '<svg');
  return root.replace(/<text([^>]*)>([^<]*)<\/text>/g, (whole, attrs: string, content: string) => {
    const family = /font-family:([^;"]+)/.exec(attrs)?.[1] ?? '';
    const bold = /font-weight:(bold|[6-9]00)/.test(attrs);
    const key = fontFor(family, bold, decode(content));
    const next = attrs.replace(/font-family:[^;"]+/, `font-family:${key}`).replace(/font-weight:[6-9]00/, 'font-weight:bold');
    return `<text${next}>${content}</text>`;
  });
}

/** One figure per page, numbered as given, as a PDF file. */
export function figuresPdf(items: { snapshot: Snapshot; number?: string | null }[], meta: { title: string; institution?: string }): Promise<Buffer> {
  const doc = new PDFDocument({ size: A4_LANDSCAPE, margin: MARGIN, autoFirstPage: false, info: { Title: meta.title, Author: meta.institution || 'Tidegauge', Creator: 'Tidegauge', Producer: 'Tidegauge (PDFKit)' } });
  for (const key of Object.keys(FONT_FILES) as FontKey[]) doc.registerFont(key, fontFile(key).bytes);
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  for (const item of items) {
    const fig = exhibitFigure(item.snapshot, { width: 1200, number: item.number });
    const svg = svgForPdf(chartSvg(fig.option, fig.width, fig.height));
    doc.addPage();
    const [w, h] = A4_LANDSCAPE;
    const scale = Math.min((w - 2 * MARGIN) / fig.width, (h - 2 * MARGIN) / fig.height);
    const x = (w - fig.width * scale) / 2;
    SVGtoPDF(doc, svg, x, MARGIN, {
      width: fig.width * scale,
      height: fig.height * scale,
      assumePt: false,
      fontCallback: (family, bold) => ((Object.keys(FONT_FILES) as string[]).includes(family.trim()) ? family.trim() : bold ? 'sansBold' : 'sans'),
    });
  }
  doc.end();
  return done;
}
