import type { Metadata } from 'next';
import { bodyFont, displayFont } from '@/lib/fonts';
import './globals.css';

export const metadata: Metadata = {
  title: { default: 'Partwise', template: '%s · Partwise' },
  description: 'Fit Gaussian mixture models to your measurements and publish them as calculators any website can embed.',
};

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={`${bodyFont.variable} ${displayFont.variable}`}>
      <body className="min-h-screen font-sans">{children}</body>
    </html>
  );
}
