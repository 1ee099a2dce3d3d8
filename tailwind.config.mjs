// Coatrail's Tailwind theme: the colours come from the one palette, src/styles/palette.mjs.
import { PALETTE as P } from './src/styles/palette.mjs';

/** @type {import('tailwindcss').Config} */
export default {
  content: ['./src/**/*.{astro,html,js,jsx,ts,tsx,md}'],
  theme: {
    extend: {
      fontFamily: {
        sans: ['"Atkinson Hyperlegible"', 'system-ui', 'sans-serif'],
        mono: ['"JetBrains Mono"', 'ui-monospace', 'monospace'],
      },
      colors: {
        paper: P.paper,
        ink: { DEFAULT: P.ink, soft: P.inkSoft, faint: P.inkFaint },
        slate: { line: P.slateLine, panel: P.slatePanel, deep: P.slateDeep },
        lacquer: { DEFAULT: P.lacquer, dark: P.lacquerDark, light: P.lacquerLight },
        // abnormal states only
        alert: { high: P.alertHigh, med: P.alertMed, low: P.alertLow, bg: P.alertBg },
        ok: { DEFAULT: P.ok },
      },
    },
  },
  plugins: [],
};
