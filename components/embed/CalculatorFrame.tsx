import type { CSSProperties, ReactNode } from 'react';
import { HostLink } from './useHostSize';

/** The calculator's own page shell: no app chrome, the embed's theme and accent colour. */
export function CalculatorFrame({ theme, accent, accentText, children }: { theme: 'light' | 'dark'; accent: string; accentText: string; children: ReactNode }) {
  const style = { '--accent': accent, '--accent-text': accentText, colorScheme: theme } as CSSProperties;
  return (
    // Tailwind's dark: variants match descendants of .dark, so the class sits one level up.
    <div className={theme === 'dark' ? 'pw-calculator dark' : 'pw-calculator'} style={style}>
      <div className="min-h-screen bg-white dark:bg-dusk-900">
        {/* Measured for the host's iframe height: no min-height here, or it could never shrink. */}
        <main id="partwise-calculator-root" className="px-4 py-5 text-ink dark:text-[#f3efe7] sm:px-6">
          <div className="mx-auto max-w-xl">{children}</div>
        </main>
      </div>
    </div>
  );
}

/** A switched-off calculator: says so inside the host's frame (and still tells the loader it is up, so the frame stays). */
export function CalculatorUnavailable({ theme, token, hostOrigin }: { theme: 'light' | 'dark'; token: string; hostOrigin: string | null }) {
  return (
    <CalculatorFrame theme={theme} accent="#2f6f5e" accentText="#ffffff">
      <HostLink token={token} hostOrigin={hostOrigin} />
      <div className="py-6 text-center">
        <h1 className="text-xl font-bold">This calculator is not available</h1>
        <p className="mt-2 text-sm text-ink-soft dark:text-[#b9bfcc]">It may have been taken offline by its publisher. Please try again later.</p>
      </div>
    </CalculatorFrame>
  );
}

/** No calculator at this address (never published, or replaced by a new address): a neutral notice without app chrome. */
export function CalculatorMissing() {
  return (
    <CalculatorFrame theme="light" accent="#2f6f5e" accentText="#ffffff">
      <div className="py-6 text-center" data-testid="calculator-missing">
        <h1 className="text-xl font-bold">There is no calculator at this address</h1>
        <p className="mt-2 text-sm text-ink-soft">The address may be mistyped, or the publisher may have replaced it with a new one. The site that linked here can give you the current address.</p>
      </div>
    </CalculatorFrame>
  );
}
