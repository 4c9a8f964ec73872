/**
 * The languages a calculator speaks and how one is chosen. Pure, so the calculator page,
 * the settings schema and the browser share it.
 */
export const LANGUAGES = ['en', 'de', 'fr', 'es'] as const;
export type Language = (typeof LANGUAGES)[number];

/** What a publisher can choose: a fixed language, or 'auto' to follow the visitor's browser. */
export const LANGUAGE_SETTINGS = ['auto', ...LANGUAGES] as const;
export type LanguageSetting = (typeof LANGUAGE_SETTINGS)[number];

/** Names of the choices for the (English) studio's select, each with the language's own name. */
export const LANGUAGE_NAMES: Record<LanguageSetting, string> = {
  auto: "Follow the visitor's browser (English if none of these)",
  en: 'English',
  de: 'German (Deutsch)',
  fr: 'French (Français)',
  es: 'Spanish (Español)',
};

/** The Intl locale behind each language: its number formats. */
const LOCALES: Record<Language, string> = { en: 'en-GB', de: 'de-DE', fr: 'fr-FR', es: 'es-ES' };
export const localeOf = (language: Language): string => LOCALES[language];

export const isLanguage = (v: unknown): v is Language => typeof v === 'string' && (LANGUAGES as readonly string[]).includes(v);

/**
 * The first supported language of an Accept-Language header, by quality then order
 * ("de-CH, fr;q=0.8" → de); English when the header names none of ours.
 */
export function languageFromAcceptLanguage(header: string | null | undefined): Language {
  if (!header) return 'en';
  const wanted = header
    .split(',')
    .slice(0, 32)
    .map((part, order) => {
      const [tag, ...params] = part.trim().split(';');
      const q = params.map((p) => /^\s*q=([0-9.]+)\s*$/i.exec(p)).find(Boolean);
      const quality = q ? Number(q[1]) : 1;
      return { primary: tag.trim().toLowerCase().split('-')[0], quality: Number.isFinite(quality) ? quality : 0, order };
    })
    .filter((w) => w.quality > 0)
    .sort((a, b) => b.quality - a.quality || a.order - b.order);
  return wanted.map((w) => w.primary).find(isLanguage) ?? 'en';
}

/** The language a calculator speaks to this visitor. */
export function resolveLanguage(setting: string | null | undefined, acceptLanguage: string | null | undefined): Language {
  return isLanguage(setting) ? setting : languageFromAcceptLanguage(acceptLanguage);
}
