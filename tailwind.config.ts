import type { Config } from 'tailwindcss';

// Fieldmark's own look: a calm slate-and-teal workbench, high contrast for long reads.
const config: Config = {
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}', './lib/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        ink: { DEFAULT: '#1c2430', soft: '#475467', faint: '#667085' },
        paper: { DEFAULT: '#f7f8f6', raised: '#ffffff', sunk: '#eef0ec' },
        brand: { DEFAULT: '#0f6e6a', dark: '#0b5350', light: '#d8efed' },
        line: '#d6dad3',
        warn: { DEFAULT: '#9a5b00', bg: '#fff4e0' },
        danger: { DEFAULT: '#b42318', bg: '#fdecea' },
        ok: { DEFAULT: '#1f7a3a', bg: '#e6f4ea' },
      },
      fontFamily: { sans: ['var(--font-inter)', 'system-ui', 'sans-serif'] },
    },
  },
};

export default config;
