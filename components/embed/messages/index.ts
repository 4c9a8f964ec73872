import type { Language } from '@/lib/i18n/languages';
import { de } from './de';
import { en, type Messages } from './en';
import { es } from './es';
import { fr } from './fr';

export type { Messages } from './en';

/** All four catalogues are small (a few kB gzipped together), so they ship with the calculator and switch without a round trip. */
export const catalogues: Record<Language, Messages> = { en, de, fr, es };

export const messagesFor = (language: Language): Messages => catalogues[language];
