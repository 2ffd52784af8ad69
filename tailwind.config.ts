// Modeshelf's look (DEVELOPERS.md, Conventions, "Look") as theme tokens: a warm off-white drafting sheet, graphite text, one deep
// teal accent, thin rules, and the Okabe & Ito (2008) colour-blind-safe palette for states and series.
// Loaded by `@config` in app/globals.css (Tailwind CSS 4 reads the JavaScript config that way).
import type { Config } from 'tailwindcss';

const config: Config = {
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}', './lib/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        sheet: { DEFAULT: '#f6f3ea', raised: '#fbf9f3', sunk: '#ece7da' },
        graphite: { DEFAULT: '#2a2c2e', soft: '#575a5e', faint: '#8a8c8e' },
        rule: { DEFAULT: '#d6cfbd', strong: '#b9b09a' },
        teal: { DEFAULT: '#0c5b5f', deep: '#08464a', soft: '#d9e9e7' },
        // Okabe & Ito (2008), "Color Universal Design": distinguishable with every common colour vision.
        okabe: {
          orange: '#E69F00',
          sky: '#56B4E9',
          green: '#009E73',
          yellow: '#F0E442',
          blue: '#0072B2',
          vermillion: '#D55E00',
          purple: '#CC79A7',
        },
      },
      fontFamily: {
        sans: ['var(--font-plex-sans)', 'system-ui', 'sans-serif'],
        mono: ['var(--font-plex-mono)', 'ui-monospace', 'monospace'],
      },
      borderRadius: { sheet: '2px' },
      spacing: { rail: '15rem' },
    },
  },
};

export default config;
