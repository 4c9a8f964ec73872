'use client';
import { useEffect, useState } from 'react';
import { CalculatorFrame } from '@/components/embed/CalculatorFrame';
import { messagesFor } from '@/components/embed/messages';
import { languageFromAcceptLanguage, type Language } from '@/lib/i18n/languages';

/** A fault inside a calculator page: a neutral notice for the host's frame, without the app's chrome, in the browser's language. */
export default function CalculatorError({ retry }: { error: unknown; retry: () => void }) {
  const [language, setLanguage] = useState<Language>('en');
  // Read after mounting, so the server's English render and the first client render agree.
  useEffect(() => setLanguage(languageFromAcceptLanguage(navigator.languages?.join(',') || navigator.language)), []);
  const t = messagesFor(language).page;
  return (
    <CalculatorFrame theme="light" accent="#2f6f5e" accentText="#ffffff" language={language}>
      <div className="py-6 text-center">
        <h1 className="text-xl font-bold">{t.errorHeading}</h1>
        <p className="mt-2 text-sm text-ink-soft">{t.errorBody}</p>
        <button type="button" onClick={() => retry()} className="mt-4 rounded-full px-5 py-2 text-sm font-bold ring-1 ring-current">
          {t.tryAgain}
        </button>
      </div>
    </CalculatorFrame>
  );
}
