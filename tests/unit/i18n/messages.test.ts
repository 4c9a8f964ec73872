import { describe, expect, it } from 'vitest';
import { catalogues } from '@/components/embed/messages';
import { LANGUAGES, languageFromAcceptLanguage, resolveLanguage } from '@/lib/i18n/languages';
import { loaderLanguage, loaderMessages } from '@/embed/loader-messages';

/** Every key path of a catalogue, with the kind of value behind it (and a function's arity). */
function shape(value: unknown, path = ''): string[] {
  if (typeof value === 'function') return [`${path} fn/${value.length}`];
  if (typeof value === 'string') return [`${path} text`];
  if (value && typeof value === 'object') return Object.keys(value).sort().flatMap((k) => shape((value as Record<string, unknown>)[k], path ? `${path}.${k}` : k));
  return [`${path} ${typeof value}`];
}

/** Calls every message with sample arguments, so each can be checked as the visitor would see it. */
function rendered(value: unknown, path = ''): [string, string][] {
  if (typeof value === 'string') return [[path, value]];
  if (typeof value === 'function') {
    const args = /notUsed/.test(path) ? [['Average speed', 'Climbing per ride']] : ['Average speed', '10', '45', 'km/h'];
    return [[path, String((value as (...a: unknown[]) => unknown)(...args))]];
  }
  if (value && typeof value === 'object') return Object.entries(value).flatMap(([k, v]) => rendered(v, path ? `${path}.${k}` : k));
  return [];
}

describe('the calculator message catalogue', () => {
  const source = shape(catalogues.en);

  it.each(LANGUAGES.filter((l) => l !== 'en'))('%s has exactly the English keys, each of the same kind', (language) => {
    expect(shape(catalogues[language])).toEqual(source);
  });

  it.each(LANGUAGES)('%s: every message is written (no empty text, no English left behind in another language)', (language) => {
    const messages = rendered(catalogues[language]);
    expect(messages.length).toBeGreaterThan(60);
    for (const [path, text] of messages) {
      expect(text.trim().length, path).toBeGreaterThan(0);
      expect(text, path).not.toMatch(/undefined|\[object|NaN/);
    }
    if (language === 'en') return;
    const english = new Map(rendered(catalogues.en));
    // Texts that are the same in every language: only names and symbols.
    const sameEverywhere = new Set<string>([]);
    for (const [path, text] of messages) if (!sameEverywhere.has(path)) expect(text, `${language} ${path}`).not.toBe(english.get(path));
  });

  it('places the publisher’s words and the formatted numbers into the sentences unchanged', () => {
    expect(catalogues.de.accepted('10', '45', 'km/h')).toBe('Zulässig: 10 bis 45 km/h.');
    expect(catalogues.en.accepted('1,000', '3,000', '')).toBe('Accepted: 1,000 to 3,000.');
    expect(catalogues.fr.outOfRange('Vitesse', '10', '45', 'km/h')).toContain('10 et 45 km/h');
    expect(catalogues.es.notUsed(['Desnivel', 'Distancia'])).toContain('Desnivel y Distancia');
    expect(catalogues.en.notUsed(['A', 'B', 'C'])).toContain('A, B and C');
    expect(catalogues.de.reason.towards('Bergfreunde', true)).toBe('Spricht deutlich für Bergfreunde.');
  });
});

describe("the loader's notice on the host page", () => {
  it.each(LANGUAGES)('%s has every loader text, written', (language) => {
    expect(shape(loaderMessages[language])).toEqual(shape(loaderMessages.en));
    for (const [path, text] of rendered(loaderMessages[language])) {
      expect(text.trim().length, path).toBeGreaterThan(0);
      if (language !== 'en') expect(text, path).not.toBe(rendered(loaderMessages.en).find(([p]) => p === path)?.[1]);
    }
  });

  it("speaks the placeholder's data-partwise-language, else the host page's lang, else English", () => {
    expect(loaderLanguage('fr', 'de-AT')).toBe('fr');
    expect(loaderLanguage(null, 'de-AT')).toBe('de');
    expect(loaderLanguage('nl', 'ES')).toBe('es');
    expect(loaderLanguage(null, 'ja')).toBe('en');
    expect(loaderLanguage(undefined, '')).toBe('en');
  });
});

describe('choosing the calculator language', () => {
  it('takes the publisher’s fixed choice over the browser', () => {
    expect(resolveLanguage('de', 'fr-FR,fr;q=0.9')).toBe('de');
    expect(resolveLanguage('es', null)).toBe('es');
  });

  it("follows Accept-Language for 'auto', by quality then order, English when none of ours is asked for", () => {
    expect(resolveLanguage('auto', 'de-CH,de;q=0.9,en;q=0.8')).toBe('de');
    expect(languageFromAcceptLanguage('nl-NL, fr;q=0.7, es;q=0.9')).toBe('es');
    expect(languageFromAcceptLanguage('en-US,en;q=0.9,fr;q=0.8')).toBe('en');
    expect(languageFromAcceptLanguage('FR')).toBe('fr');
    expect(languageFromAcceptLanguage('ja, zh;q=0.5')).toBe('en');
    expect(languageFromAcceptLanguage('de;q=0, fr;q=0.2')).toBe('fr');
    expect(languageFromAcceptLanguage('*')).toBe('en');
    expect(languageFromAcceptLanguage('')).toBe('en');
    expect(languageFromAcceptLanguage(undefined)).toBe('en');
    // A stored value from somewhere else is not trusted as a language.
    expect(resolveLanguage('xx', 'es-MX')).toBe('es');
  });
});
