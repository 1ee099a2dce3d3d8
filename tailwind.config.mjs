/** @type {import('tailwindcss').Config} */
// Coatrail palette: a calm slate-and-paper base (ISA-101 style: grey for normal),
// with colour reserved for abnormal states. Names are ours.
export default {
  content: ['./src/**/*.{astro,html,js,jsx,ts,tsx,md}'],
  theme: {
    extend: {
      fontFamily: {
        sans: ['"Atkinson Hyperlegible"', 'system-ui', 'sans-serif'],
        mono: ['"JetBrains Mono"', 'ui-monospace', 'monospace'],
      },
      colors: {
        paper: '#f4f3ef',
        ink: { DEFAULT: '#1f2529', soft: '#4a545b', faint: '#7b858c' },
        slate: { line: '#c9cdcf', panel: '#e8e8e3', deep: '#2d3a42' },
        lacquer: { DEFAULT: '#2f6f73', dark: '#1f4e51', light: '#d7e8e6' },
        // abnormal states only
        alert: { high: '#b3261e', med: '#c26a00', low: '#8a6d00', bg: '#fbe9e7' },
        ok: { DEFAULT: '#3c6e47' },
      },
    },
  },
  plugins: [],
};
