import type { CSSProperties, ReactNode } from 'react';
import type { Language } from '@/lib/i18n/languages';
import { messagesFor } from './messages';
import { HostLink } from './useHostSize';

/** The calculator's own page shell: no app chrome, the embed's theme and accent colour. */
export function CalculatorFrame({ theme, accent, accentText, language = 'en', children }: { theme: 'light' | 'dark'; accent: string; accentText: string; language?: Language; children: ReactNode }) {
  const style = { '--accent': accent, '--accent-text': accentText, colorScheme: theme } as CSSProperties;
  return (
    // Tailwind's dark: variants match descendants of .dark, so the class sits one level up.
    <div className={theme === 'dark' ? 'pw-calculator dark' : 'pw-calculator'} style={style}>
      <div className="min-h-screen bg-white dark:bg-dusk-900">
        {/* Measured for the host's iframe height: no min-height here, or it could never shrink. */}
        <main id="partwise-calculator-root" lang={language} className="px-4 py-5 text-ink dark:text-[#f3efe7] sm:px-6">
          <div className="mx-auto max-w-xl">{children}</div>
        </main>
      </div>
    </div>
  );
}

/** A switched-off calculator: says so inside the host's frame (and still tells the loader it is up, so the frame stays). */
export function CalculatorUnavailable({ theme, token, hostOrigin, language }: { theme: 'light' | 'dark'; token: string; hostOrigin: string | null; language: Language }) {
  const t = messagesFor(language).page;
  return (
    <CalculatorFrame theme={theme} accent="#2f6f5e" accentText="#ffffff" language={language}>
      <HostLink token={token} hostOrigin={hostOrigin} />
      <div className="py-6 text-center">
        <h1 className="text-xl font-bold">{t.unavailableHeading}</h1>
        <p className="mt-2 text-sm text-ink-soft dark:text-[#b9bfcc]">{t.unavailableBody}</p>
      </div>
    </CalculatorFrame>
  );
}

/** No calculator at this address (never published, or replaced by a new address): a neutral notice without app chrome. */
export function CalculatorMissing({ language }: { language: Language }) {
  const t = messagesFor(language).page;
  return (
    <CalculatorFrame theme="light" accent="#2f6f5e" accentText="#ffffff" language={language}>
      <div className="py-6 text-center" data-testid="calculator-missing">
        <h1 className="text-xl font-bold">{t.missingHeading}</h1>
        <p className="mt-2 text-sm text-ink-soft">{t.missingBody}</p>
      </div>
    </CalculatorFrame>
  );
}
