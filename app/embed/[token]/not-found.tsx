import { headers } from 'next/headers';
import { CalculatorMissing } from '@/components/embed/CalculatorFrame';
import { languageFromAcceptLanguage } from '@/lib/i18n/languages';

/**
 * An unknown or replaced calculator address. Shown inside whatever frames it (the
 * studio preview, a host page), so it carries none of the app's chrome or wording;
 * with no calculator to ask, it speaks the visitor's browser language.
 */
export default async function CalculatorNotFound() {
  return <CalculatorMissing language={languageFromAcceptLanguage((await headers()).get('accept-language'))} />;
}
