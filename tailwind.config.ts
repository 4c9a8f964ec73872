import type { Config } from 'tailwindcss';

// Partwise's own palette: warm paper, ink text, a moss primary and a saffron accent.
const config: Config = {
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}', './lib/**/*.{ts,tsx}'],
  darkMode: 'class',
  theme: {
    extend: {
      colors: {
        paper: { DEFAULT: '#faf7f2', deep: '#f1ebe0' },
        // faint and saffron 700 are text colours too: both reach 4.5:1 on white, paper and paper-deep (WCAG 2.1 AA).
        ink: { DEFAULT: '#1d2330', soft: '#4a5366', faint: '#636a79' },
        moss: { 50: '#eef6f3', 100: '#d3e9e1', 300: '#7fb8a6', 500: '#3a8a74', 600: '#2f6f5e', 700: '#245649', 900: '#142f28' },
        saffron: { 100: '#fbefd2', 300: '#f0c763', 500: '#e0a526', 700: '#8a620c' },
        clay: { 100: '#f8e1dc', 500: '#b8432f', 700: '#84281a' },
        dusk: { 800: '#202635', 900: '#151924' },
      },
      fontFamily: {
        sans: ['var(--font-body)', 'system-ui', 'sans-serif'],
        display: ['var(--font-display)', 'Georgia', 'serif'],
      },
      fontSize: {
        // A modular scale (ratio 1.2) so headings and body stay in proportion.
        xs: ['0.75rem', { lineHeight: '1.1rem' }],
        sm: ['0.875rem', { lineHeight: '1.3rem' }],
        base: ['1rem', { lineHeight: '1.55rem' }],
        lg: ['1.2rem', { lineHeight: '1.75rem' }],
        xl: ['1.44rem', { lineHeight: '2rem' }],
        '2xl': ['1.728rem', { lineHeight: '2.3rem' }],
        '3xl': ['2.074rem', { lineHeight: '2.6rem' }],
        '4xl': ['2.488rem', { lineHeight: '3rem' }],
        '5xl': ['2.986rem', { lineHeight: '3.4rem' }],
      },
      borderRadius: { card: '0.9rem' },
      boxShadow: { card: '0 1px 2px rgba(29,35,48,0.06), 0 4px 16px rgba(29,35,48,0.06)' },
    },
  },
  plugins: [],
};

export default config;
