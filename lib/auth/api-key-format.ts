import { createHash, timingSafeEqual } from 'node:crypto';
import { customAlphabet } from 'nanoid';

/**
 * The text of a workspace API key, `pwk_<prefix>_<secret>`, and its fingerprint. Pure
 * (no database), so unit tests and scripts read it too; lib/auth/api-keys.ts stores and checks keys.
 */
const ALPHABET = '0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz';
export const KEY_PREFIX_LENGTH = 10;
/** 40 characters of 62: about 238 bits. */
export const KEY_SECRET_LENGTH = 40;
const newPrefix = customAlphabet(ALPHABET, KEY_PREFIX_LENGTH);
const newSecret = customAlphabet(ALPHABET, KEY_SECRET_LENGTH);
/** Letters and digits only, so the underscores that join the parts never occur inside one. */
const KEY_PATTERN = new RegExp(`^pwk_([0-9A-Za-z]{${KEY_PREFIX_LENGTH}})_([0-9A-Za-z]{32,128})$`);

/** The parts of a key as sent, or null when it is not shaped like one of ours. */
export function parseApiKey(raw: string): { prefix: string; secret: string } | null {
  const m = KEY_PATTERN.exec(raw);
  return m ? { prefix: m[1], secret: m[2] } : null;
}

export function hashApiKey(key: string): string {
  return createHash('sha256').update(key, 'utf8').digest('hex');
}

/** A fresh key: the whole text (to show once) and what is stored. */
export function generateApiKey(): { key: string; prefix: string; secretHash: string } {
  const prefix = newPrefix();
  const key = `pwk_${prefix}_${newSecret()}`;
  return { key, prefix, secretHash: hashApiKey(key) };
}

/** Same-length hex digests compared without an early exit. */
export function sameHash(a: string, b: string): boolean {
  const x = Buffer.from(a, 'hex');
  const y = Buffer.from(b, 'hex');
  return x.length === y.length && x.length > 0 && timingSafeEqual(x, y);
}

