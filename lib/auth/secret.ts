import { localSecretPath, readLocalSecret } from './local-secret';

/**
 * The secret that signs session cookies: NEXTAUTH_SECRET when set (a deployment must
 * set it; the server refuses to start otherwise, see lib/server/settings.ts). A local
 * run (PARTWISE_LOCAL=1, `npm start` without a secret) reads the random secret the
 * app server made in the data directory (lib/auth/local-secret.ts). There is no
 * fallback: nothing derived from public values, and no placeholder, ever signs a session.
 */
let local: { file: string; secret: string } | undefined;

export function authSecret(): string {
  const configured = process.env.NEXTAUTH_SECRET || process.env.AUTH_SECRET;
  if (configured) return configured;
  if (process.env.PARTWISE_LOCAL === '1') {
    const file = localSecretPath();
    // Read once per process: the server checked the file before it listened.
    if (local?.file !== file) local = { file, secret: readLocalSecret(file) };
    return local.secret;
  }
  throw new Error('NEXTAUTH_SECRET is not set: sessions cannot be signed. Set it to a long random string, or run `npm start` for a local run.');
}
