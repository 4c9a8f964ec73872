/**
 * The loader's few fixed texts (the stand-in for a refused frame and the frame's default
 * title), kept apart from the calculator's catalogue so the host-page script stays a few
 * kB: typed per language, so a missing language or key is a type error, and checked with
 * the catalogue by tests/unit/i18n/messages.test.ts.
 */
import type { Language } from '../lib/i18n/languages';

export interface LoaderMessages {
  refusedTitle: string;
  refusedHint: string;
  frameTitle: string;
}

export const loaderMessages: Record<Language, LoaderMessages> = {
  en: {
    refusedTitle: 'This calculator cannot be shown on this page.',
    refusedHint: 'If this is your website, check the calculator\u2019s address and its allowed websites in Partwise.',
    frameTitle: 'Group membership calculator',
  },
  de: {
    refusedTitle: 'Dieser Rechner kann auf dieser Seite nicht angezeigt werden.',
    refusedHint: 'Wenn dies Ihre Website ist, prüfen Sie in Partwise die Adresse des Rechners und die Websites, auf denen er erscheinen darf.',
    frameTitle: 'Rechner zur Gruppenzugehörigkeit',
  },
  fr: {
    refusedTitle: 'Ce calculateur ne peut pas être affiché sur cette page.',
    refusedHint: 'S\u2019il s\u2019agit de votre site, vérifiez dans Partwise l\u2019adresse du calculateur et les sites autorisés à l\u2019afficher.',
    frameTitle: 'Calculateur d\u2019appartenance à un groupe',
  },
  es: {
    refusedTitle: 'Esta calculadora no se puede mostrar en esta página.',
    refusedHint: 'Si este es su sitio web, compruebe en Partwise la dirección de la calculadora y los sitios en los que puede aparecer.',
    frameTitle: 'Calculadora de pertenencia a grupos',
  },
};

/**
 * The loader's language: the placeholder's data-partwise-language if it names one of
 * ours, else the host page's own lang ("de-AT" → de), else English. The notice sits in
 * the host's page, so it speaks the page's language.
 */
export function loaderLanguage(attribute: string | null | undefined, pageLang: string | null | undefined): Language {
  for (const tag of [attribute, pageLang]) {
    const primary = (tag || '').trim().toLowerCase().split('-')[0];
    if (primary === 'en' || primary === 'de' || primary === 'fr' || primary === 'es') return primary;
  }
  return 'en';
}
