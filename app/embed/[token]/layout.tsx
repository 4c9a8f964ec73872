import type { Metadata, Viewport } from 'next';

/** Calculator pages live inside other sites' iframes: no app chrome, not indexed. */
export const metadata: Metadata = { robots: { index: false, follow: false } };
export const viewport: Viewport = { width: 'device-width', initialScale: 1 };

export default function CalculatorLayout({ children }: { children: React.ReactNode }) {
  return children;
}
