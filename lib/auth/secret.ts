import { createHash } from 'node:crypto';

/**
 * The secret that signs session cookies. Production must set NEXTAUTH_SECRET; local
 * runs derive a stable one from the database path so restarts keep people signed in.
 */
export function authSecret(): string {
  const configured = process.env.NEXTAUTH_SECRET ?? process.env.AUTH_SECRET;
  if (configured) return configured;
  // `next build` evaluates route modules; nothing is signed at build time.
  if (process.env.NEXT_PHASE === 'phase-production-build') return 'build-phase-placeholder';
  if (process.env.NODE_ENV === 'production' && process.env.PARTWISE_LOCAL !== '1') {
    throw new Error('NEXTAUTH_SECRET must be set in production (a long random string).');
  }
  return createHash('sha256').update(`partwise-local:${process.env.DATABASE_URL ?? 'data/partwise.sqlite'}`).digest('hex');
}
