import { ZxcvbnFactory, type ZxcvbnResult } from '@zxcvbn-ts/core';
import * as common from '@zxcvbn-ts/language-common';
import * as english from '@zxcvbn-ts/language-en';
import { AppError } from '@/lib/errors';

/**
 * Refuses passwords people choose but attackers guess first: common ones (the
 * zxcvbn-ts lists of leaked passwords, words and names, keyboard rows, dates), and
 * ones built from the person's own address or name. Server-side only: the
 * dictionaries are several MB and would otherwise ship to every sign-up page; the
 * form's own check (schemas.ts) stays the cheap length rule.
 *
 * zxcvbn-ts v4 ships its dictionaries compressed inside the language packages and
 * decompresses them when the modules load, so the estimator is built once, on the
 * first password checked, not at import time of every account module.
 */
export const MIN_PASSWORD_SCORE = 3;
/** Name or address parts shorter than this are too generic to refuse on their own. */
const MIN_PERSONAL_PART = 3;

// Partwise's own words for the estimator's findings (same keys as the library's translations).
const translations = {
  warnings: {
    straightRow: 'it follows a straight row of keys.',
    keyPattern: 'it is a short keyboard pattern.',
    simpleRepeat: 'it repeats the same character.',
    extendedRepeat: 'it repeats the same group of characters.',
    sequences: 'it contains a run like "abc" or "1234".',
    recentYears: 'it contains a recent year.',
    dates: 'it contains a date.',
    topTen: 'it is one of the most used passwords there are.',
    topHundred: 'it is among the most used passwords.',
    common: 'it is on lists of commonly used passwords.',
    similarToCommon: 'it is a small change to a commonly used password.',
    wordByItself: 'it is a single dictionary word.',
    namesByThemselves: 'it is a single first name or surname.',
    commonNames: 'it is made of common names.',
    userInputs: 'it contains your name or e-mail address.',
    pwned: 'it has appeared in published password leaks.',
  },
  suggestions: {
    l33t: 'Swapping letters for look-alike symbols (@ for a) does not help much.',
    reverseWords: 'Spelling a word backwards does not help much.',
    allUppercase: 'Capitals everywhere do not help; mix only a few in.',
    capitalization: 'A capital first letter does not help much.',
    dates: 'Leave out dates and years that belong to you.',
    recentYears: 'Leave out recent years.',
    associatedYears: 'Leave out years that belong to you.',
    sequences: 'Leave out runs like "abc" or "1234".',
    repeated: 'Leave out repeated words and characters.',
    longerKeyboardPattern: 'Keyboard patterns need to be long and change direction to help.',
    anotherWord: 'Add another word or two that are not common: a few unrelated words in a row are strong and easy to remember.',
    useWords: 'A few unrelated words in a row work well; avoid well-known phrases.',
    noNeed: 'Length matters more than symbols, digits or capitals.',
    pwned: 'If you use it anywhere else, change it there too.',
  },
  timeEstimation: {
    ltSecond: 'less than a second',
    second: '{base} second',
    seconds: '{base} seconds',
    minute: '{base} minute',
    minutes: '{base} minutes',
    hour: '{base} hour',
    hours: '{base} hours',
    day: '{base} day',
    days: '{base} days',
    month: '{base} month',
    months: '{base} months',
    year: '{base} year',
    years: '{base} years',
    centuries: 'centuries',
  },
};

let estimator: ZxcvbnFactory | undefined;

function strengthEstimator(): ZxcvbnFactory {
  estimator ??= new ZxcvbnFactory({
    dictionary: { ...common.dictionary, ...english.dictionary },
    graphs: common.adjacencyGraphs,
    translations,
    // Near-misses of listed passwords are still caught through l33t and variation rules; the
    // full edit-distance pass costs 0.1–1 s of CPU per check on the sign-up path.
    useLevenshteinDistance: false,
  });
  return estimator;
}

export interface PasswordOwner {
  email?: string | null;
  name?: string | null;
}

/** Lower case, letters and digits only: "Ines.Varga" and "ines-varga" are the same to a guesser. */
function folded(s: string): string {
  return s.toLowerCase().normalize('NFKD').replace(/[^\p{L}\p{N}]+/gu, '');
}

/** The person's own words, for the containment rule and as zxcvbn's user-input dictionary. */
export function personalInputs(owner: PasswordOwner): { label: string; value: string }[] {
  const email = owner.email?.trim().toLowerCase() ?? '';
  const local = email.includes('@') ? email.slice(0, email.indexOf('@')) : email;
  const out: { label: string; value: string }[] = [];
  if (email) out.push({ label: 'your e-mail address', value: email });
  if (owner.name?.trim()) out.push({ label: 'your name', value: owner.name.trim() });
  if (local) out.push({ label: 'the first part of your e-mail address', value: local });
  return out;
}

export interface PasswordVerdict {
  ok: boolean;
  /** Why it is refused and what helps, for the password field. */
  message?: string;
  score: number;
}

/** The reason a password is refused, in words for the person choosing it; `ok` when it is fine. */
export function judgePassword(password: string, owner: PasswordOwner = {}): PasswordVerdict {
  const inputs = personalInputs(owner);
  const plain = folded(password);
  for (const input of inputs) {
    const part = folded(input.value);
    if (part.length >= MIN_PERSONAL_PART && plain.includes(part)) {
      return { ok: false, score: 0, message: `This password contains ${input.label}, which is the first thing anyone would try. Choose one without it, for example a few unrelated words.` };
    }
  }
  // Name words and address pieces count as known words, so "Varga" inside a password costs it strength.
  const words = new Set<string>();
  for (const input of inputs) {
    words.add(input.value.toLowerCase());
    for (const w of input.value.toLowerCase().split(/[^\p{L}\p{N}]+/u)) if (w.length >= MIN_PERSONAL_PART) words.add(w);
  }
  // "Varga Ines 2026": nothing but the person's own words, reordered, plus digits and punctuation.
  let rest = plain;
  for (const w of [...words].map(folded).sort((a, b) => b.length - a.length)) if (w.length >= MIN_PERSONAL_PART) rest = rest.split(w).join('');
  if (rest !== plain && rest.replace(/\p{N}+/gu, '').length < 4) {
    return { ok: false, score: 0, message: 'This password is made of your name or e-mail address, which is the first thing anyone would try. Choose one without them, for example a few unrelated words.' };
  }
  const result: ZxcvbnResult = strengthEstimator().check(password, [...words]);
  if (result.score >= MIN_PASSWORD_SCORE) return { ok: true, score: result.score };
  const why = result.feedback.warning ? `it is too easy to guess: ${result.feedback.warning}` : 'it is too easy to guess.';
  const helps = result.feedback.suggestions.join(' ');
  const advice = helps.includes('unrelated words') ? helps : `${helps} ${translations.suggestions.anotherWord}`.trim();
  return { ok: false, score: result.score, message: `This password is refused because ${why} ${advice}` };
}

/** Throws a 422 naming the password field when the password is too easy to guess. */
export function assertStrongPassword(password: string, owner: PasswordOwner, field = 'password'): void {
  const verdict = judgePassword(password, owner);
  if (verdict.ok) return;
  throw new AppError('invalid_input', 'Choose a stronger password.', { issues: [{ field, message: verdict.message! }] });
}
