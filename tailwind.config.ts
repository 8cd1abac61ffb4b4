import type { Config } from 'tailwindcss';

/** Tidegauge's own visual language (DESIGN.md): paper, ink, hairlines, teal trend, ochre/slate cycle. */
export default {
  content: ['./index.html', './src/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        paper: { DEFAULT: '#FAF8F3', deep: '#F2EEE4', card: '#FFFEFB' },
        ink: { DEFAULT: '#1E2430', soft: '#4B5263', faint: '#7A8090' },
        hairline: { DEFAULT: '#D9D4C7', strong: '#BFB8A6' },
        trend: { DEFAULT: '#0E6E68', light: '#D5EAE7' },
        above: { DEFAULT: '#B7791F', light: '#F4E6CF' },
        below: { DEFAULT: '#4A5A70', light: '#DDE2EA' },
        vintage: {
          1: '#E4DDF2',
          2: '#C6B8E4',
          3: '#A08BD0',
          4: '#7A5DB8',
          5: '#56379A',
          6: '#37206E',
        },
        alert: { DEFAULT: '#A23B2A', light: '#F6E2DD' },
        ok: { DEFAULT: '#2F6B3A', light: '#E0EEDF' },
      },
      fontFamily: {
        heading: ['Merriweather', 'Georgia', 'serif'],
        sans: ['"Source Sans 3"', 'system-ui', 'sans-serif'],
      },
    },
  },
} satisfies Config;
