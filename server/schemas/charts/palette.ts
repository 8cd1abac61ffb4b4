/**
 * The visual language of DESIGN.md for charts: palette, fonts and number formats. Shared by the
 * screen (src/components/charts), the client's PNG/SVG files and the server's PDF, so every
 * output draws with the same values.
 */

import { PALETTE } from '../palette.js';

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
  /** Contractions of the reference chronology. */
  contraction: 'rgba(30,36,48,0.09)',
  /** The end-of-sample band. */
  endBand: 'rgba(162,59,42,0.08)',
};

/**
 * Sequential violet ramp for vintages: oldest lightest, newest darkest. The colour is interpolated
 * in lightness (HSL, hue 262°) between a visible light violet and the darkest, so any number of
 * vintages gets evenly spaced steps; with few vintages the steps are at least 12 points of
 * lightness apart (common practice for a sequential ramp a reader can tell apart).
 */
export function vintageColor(index: number, count: number): string {
  const light = 78;
  const dark = 22;
  if (count <= 1) return hsl(262, 55, 32);
  const span = Math.min(light - dark, 12 * (count - 1));
  const l = dark + span - (index / (count - 1)) * span;
  return hsl(262, 50, l);
}

function hsl(h: number, s: number, l: number) {
  const a = (s / 100) * Math.min(l / 100, 1 - l / 100);
  const f = (n: number) => {
    const k = (n + h / 30) % 12;
    const c = l / 100 - a * Math.max(-1, Math.min(k - 3, 9 - k, 1));
    return Math.round(255 * c)
      .toString(16)
      .padStart(2, '0');
  };
  return `#${f(0)}${f(8)}${f(4)}`.toUpperCase();
}

/** Categorical colours for comparisons of methods or series (distinct from the trend teal). */
export const COMPARE_COLORS = ['#1E2430', '#B7791F', '#0E6E68', '#7A5DB8', '#A23B2A', '#4A5A70', '#6B8E23', '#C05A8A'];

/**
 * Font stacks. Single quotes only: SVG writers put this value inside a double-quoted attribute,
 * where a double quote would end the attribute and break the XML.
 */
export const FONT = "'Source Sans 3', sans-serif";
export const HEADING_FONT = 'Merriweather, serif';

/** A number for tables and labels: thousands separated, digits by size unless given. */
export function fmt(v: number, digits?: number): string {
  if (!Number.isFinite(v)) return '—';
  const a = Math.abs(v);
  const d = digits ?? (a >= 1000 ? 0 : a >= 100 ? 1 : a >= 1 ? 2 : 3);
  return v.toLocaleString('en-US', { minimumFractionDigits: d, maximumFractionDigits: d });
}

/** Axis ticks: thousands separated, no trailing zeros (1,250 · 0.5 · −2). */
export const axisFmt = (v: number) => Number(v.toPrecision(8)).toLocaleString('en-US', { maximumFractionDigits: 4 });
