import type { Config } from 'tailwindcss';
import { PALETTE } from './server/schemas/palette';

/** Tidegauge's own visual language (DESIGN.md): paper, ink, hairlines, teal trend, ochre/slate cycle. Colours: server/schemas/palette.ts. */
export default {
  content: ['./index.html', './src/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: PALETTE,
      fontFamily: {
        heading: ['Merriweather', 'Georgia', 'serif'],
        sans: ['"Source Sans 3"', 'system-ui', 'sans-serif'],
      },
    },
  },
} satisfies Config;
