/**
 * Tidegauge's colours (DESIGN.md's visual language), in one place: the interface's Tailwind theme
 * (tailwind.config.ts), the charts (src/components/charts/echarts.ts) and the contrast test
 * (tests/unit/palette-contrast.test.ts) read them from here.
 *
 * Shades chosen for WCAG 2.2 AA: text at least 4.5:1 on every paper it sits on (§1.4.3 Contrast
 * (Minimum)); the boundaries of form fields, focus indicators and the marks of charts at least 3:1
 * against what is next to them (§1.4.11 Non-text Contrast). Where DESIGN.md's own shade is too light
 * for text, the text takes a deeper shade of the same hue and DESIGN.md's shade stays for graphics
 * (the ochre of the cycle bars).
 */

export const PALETTE = {
  paper: { DEFAULT: '#FAF8F3', deep: '#F2EEE4', card: '#FFFEFB' },
  /** faint: was #7A8090 (3.7:1 on paper), now 5.5:1. */
  ink: { DEFAULT: '#1E2430', soft: '#4B5263', faint: '#606573' },
  /** control: the resting border of form fields (was the strong hairline, 2.0:1), 3.4:1 on paper. */
  hairline: { DEFAULT: '#D9D4C7', strong: '#BFB8A6', control: '#8F8675' },
  trend: { DEFAULT: '#0E6E68', light: '#D5EAE7' },
  /** DEFAULT: ochre text and outlines (was #B7791F, 3.4:1 on paper), 5.4:1; bar: the cycle's bars above zero. */
  above: { DEFAULT: '#8C5D18', bar: '#B7791F', light: '#F4E6CF' },
  below: { DEFAULT: '#4A5A70', light: '#DDE2EA' },
  vintage: { 1: '#E4DDF2', 2: '#C6B8E4', 3: '#A08BD0', 4: '#7A5DB8', 5: '#56379A', 6: '#37206E' },
  alert: { DEFAULT: '#A23B2A', light: '#F6E2DD' },
  ok: { DEFAULT: '#2F6B3A', light: '#E0EEDF' },
} as const;
