/**
 * Contrast of the palette (server/schemas/palette.ts) by WCAG 2.2's formulas, so that a change of
 * shade cannot lower it without a failing test (axe checks the rendered pages as well, in
 * tests/browser/a11y-axe.test.ts).
 *
 * - Relative luminance and contrast ratio: WCAG 2.2, definitions of "relative luminance" and
 *   "contrast ratio" (sRGB channels linearised with the 0.04045 threshold; (L1 + 0.05) / (L2 + 0.05)).
 * - Text: at least 4.5:1 (§1.4.3 Contrast (Minimum), level AA; all text here is under 18 pt).
 * - Boundaries of form fields, focus indicators and chart marks: at least 3:1 (§1.4.11 Non-text
 *   Contrast, level AA).
 */
import { describe, expect, it } from 'vitest';
import { PALETTE } from '../../server/schemas/palette.js';
import { COLORS, COMPARE_COLORS } from '../../src/components/charts/echarts.js';

function channel(v: number) {
  const c = v / 255;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}
export function luminance(hex: string) {
  const n = hex.replace('#', '');
  const [r, g, b] = [0, 2, 4].map((i) => channel(parseInt(n.slice(i, i + 2), 16)));
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
export function contrast(a: string, b: string) {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

const P = PALETTE;
const papers = { paper: P.paper.DEFAULT, 'paper-deep': P.paper.deep, 'paper-card': P.paper.card, white: '#FFFFFF' };
const tints = { 'trend-light': P.trend.light, 'above-light': P.above.light, 'alert-light': P.alert.light, 'ok-light': P.ok.light };

/** Text colours and the backgrounds the interface sets them on. */
const TEXT: [string, string, Record<string, string>][] = [
  ['ink', P.ink.DEFAULT, { ...papers, ...tints }],
  ['ink-soft', P.ink.soft, { ...papers, ...tints }],
  ['ink-faint', P.ink.faint, { ...papers, ...tints }],
  ['trend', P.trend.DEFAULT, { ...papers, 'trend-light': P.trend.light }],
  ['above', P.above.DEFAULT, { ...papers, 'above-light': P.above.light, 'trend-light': P.trend.light }],
  ['below', P.below.DEFAULT, papers],
  ['alert', P.alert.DEFAULT, { ...papers, 'alert-light': P.alert.light }],
  ['ok', P.ok.DEFAULT, { ...papers, 'ok-light': P.ok.light }],
  ['paper (buttons, the chosen navigation entry)', P.paper.DEFAULT, { ink: P.ink.DEFAULT, 'ink-soft (hover)': P.ink.soft }],
];

describe('the palette against WCAG 2.2 AA', () => {
  it('computes WCAG contrast ratios (the extremes and a published pair)', () => {
    expect(contrast('#000000', '#FFFFFF')).toBeCloseTo(21, 10);
    expect(contrast('#777777', '#777777')).toBe(1);
    // #767676 on white is the well-known lightest grey that passes 4.5:1 (4.54:1), common practice.
    expect(contrast('#767676', '#FFFFFF')).toBeCloseTo(4.54, 2);
    expect(contrast('#777777', '#FFFFFF')).toBeLessThan(4.5);
  });

  it('sets all text at 4.5:1 or more on every background it sits on (§1.4.3)', () => {
    const low = TEXT.flatMap(([name, color, on]) => Object.entries(on).flatMap(([bg, hex]) => (contrast(color, hex) < 4.5 ? [`${name} ${color} on ${bg} ${hex}: ${contrast(color, hex).toFixed(2)}:1`] : [])));
    expect(low).toEqual([]);
  });

  it('draws form-field boundaries, focus rings and chart marks at 3:1 or more (§1.4.11)', () => {
    const parts: [string, string, Record<string, string>][] = [
      ['form field border', P.hairline.control, papers],
      ['focus outline (trend)', P.trend.DEFAULT, { ...papers, 'paper-card': P.paper.card }],
      ['cycle bars above zero', COLORS.above, papers],
      ['cycle bars below zero', COLORS.below, papers],
      ['trend line', COLORS.trend, papers],
      ['observed line', COLORS.ink, papers],
      ...COMPARE_COLORS.map((c, i): [string, string, Record<string, string>] => [`comparison line ${i + 1}`, c, papers]),
    ];
    const low = parts.flatMap(([name, color, on]) => Object.entries(on).flatMap(([bg, hex]) => (contrast(color, hex) < 3 ? [`${name} ${color} on ${bg}: ${contrast(color, hex).toFixed(2)}:1`] : [])));
    expect(low).toEqual([]);
  });
});
