import localFont from 'next/font/local';

// Body: a typeface designed for legibility, which matters in small calculator forms.
export const bodyFont = localFont({
  src: [
    { path: '../fonts/atkinson-hyperlegible/atkinson-hyperlegible-latin-400-normal.woff2', weight: '400', style: 'normal' },
    { path: '../fonts/atkinson-hyperlegible/atkinson-hyperlegible-latin-400-italic.woff2', weight: '400', style: 'italic' },
    { path: '../fonts/atkinson-hyperlegible/atkinson-hyperlegible-latin-700-normal.woff2', weight: '700', style: 'normal' },
  ],
  variable: '--font-body',
  display: 'swap',
});

export const displayFont = localFont({
  src: [
    { path: '../fonts/fraunces/fraunces-latin-600-normal.woff2', weight: '600', style: 'normal' },
    { path: '../fonts/fraunces/fraunces-latin-700-normal.woff2', weight: '700', style: 'normal' },
  ],
  variable: '--font-display',
  display: 'swap',
});
