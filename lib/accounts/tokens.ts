import { createHash, randomBytes } from 'node:crypto';

/** A fresh one-time token for a link, and the SHA-256 hash that is all we store. */
export function newLinkToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

export function hashToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

export const HOUR = 3600_000;
export const DAY = 24 * HOUR;
