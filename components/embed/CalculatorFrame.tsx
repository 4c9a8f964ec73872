import type { CSSProperties, ReactNode } from 'react';

/** The calculator's own page shell: no app chrome, the embed's theme and accent colour. */
export function CalculatorFrame({ theme, accent, accentText, children }: { theme: 'light' | 'dark'; accent: string; accentText: string; children: ReactNode }) {
  const style = { '--accent': accent, '--accent-text': accentText, colorScheme: theme } as CSSProperties;
  return (
    // Tailwind's dark: variants match descendants of .dark, so the class sits one level up.
    <div className={theme === 'dark' ? 'dark' : undefined} style={style}>
      <div className="min-h-screen bg-white dark:bg-dusk-900">
        {/* Measured for the host's iframe height: no min-height here, or it could never shrink. */}
        <main id="partwise-calculator-root" className="px-4 py-5 text-ink dark:text-[#f3efe7] sm:px-6">
          <div className="mx-auto max-w-xl">{children}</div>
        </main>
      </div>
    </div>
  );
}

export function CalculatorUnavailable({ theme }: { theme: 'light' | 'dark' }) {
  return (
    <CalculatorFrame theme={theme} accent="#2f6f5e" accentText="#ffffff">
      <div className="py-6 text-center">
        <h1 className="text-xl font-bold">This calculator is not available</h1>
        <p className="mt-2 text-sm text-ink-soft dark:text-[#b9bfcc]">It may have been taken offline by its publisher. Please try again later.</p>
      </div>
    </CalculatorFrame>
  );
}
