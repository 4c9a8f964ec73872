import { LocalSecretError, MIN_SECRET_LENGTH, localSecretPath, readLocalSecret } from '@/lib/auth/local-secret';
import { FitQueueConfigError, fitQueueMode } from '@/lib/fitting/queue-config';
import { KNOWN_PAYMENT_KEYS, KNOWN_SESSION_SECRETS, KNOWN_WEBHOOK_SECRETS, isKnownSecret } from './known-secrets';

/**
 * Settings a production server cannot run without, checked before it listens so a
 * missing secret is a clear start-up error, not a failure on someone's first sign-in.
 * Secrets come only from the environment (or, for a local run, the random secret file
 * in the data directory); nothing here has a production default, and values that are
 * public because the repository contains them are refused.
 */
export function productionSettingProblems(env: Record<string, string | undefined> = process.env): string[] {
  const problems: string[] = [];
  const local = env.PARTWISE_LOCAL === '1';
  const secret = env.NEXTAUTH_SECRET || env.AUTH_SECRET;
  if (secret) {
    if (isKnownSecret(KNOWN_SESSION_SECRETS, secret)) problems.push('NEXTAUTH_SECRET is a value published in the Partwise source (a test or example secret): anyone could sign sessions with it. Set a long random string of your own (for example `openssl rand -base64 48`).');
    else if (secret.length < MIN_SECRET_LENGTH) problems.push(`NEXTAUTH_SECRET is only ${secret.length} characters long; use at least ${MIN_SECRET_LENGTH} random characters.`);
  } else if (local) {
    // A local run signs with the random secret kept in the data directory; it must be sound.
    try {
      readLocalSecret(localSecretPath(env));
    } catch (e) {
      if (!(e instanceof LocalSecretError)) throw e;
      problems.push(`Local run: ${e.message} Delete it and start again with \`npm start\` to make a new one.`);
    }
  } else {
    problems.push('NEXTAUTH_SECRET is not set: sessions cannot be signed. Set it to a long random string (for example `openssl rand -base64 48`).');
  }
  const url = env.NEXTAUTH_URL;
  if (!url) problems.push('NEXTAUTH_URL is not set: the public address of the app (for example https://partwise.example.com) is needed for sign-in links, mails and origin checks.');
  else {
    try {
      new URL(url);
    } catch {
      problems.push(`NEXTAUTH_URL "${url}" is not an absolute address such as https://partwise.example.com.`);
    }
  }
  if (env.STRIPE_SECRET_KEY && !env.STRIPE_WEBHOOK_SECRET) problems.push('STRIPE_SECRET_KEY is set but STRIPE_WEBHOOK_SECRET is not: payments would never be confirmed. Set the webhook signing secret too.');
  if (!local) {
    // A deployment: the payment fake's old fixed keys and the tests' keys are public.
    if (isKnownSecret(KNOWN_PAYMENT_KEYS, env.STRIPE_SECRET_KEY)) problems.push('STRIPE_SECRET_KEY is a key published in the Partwise source (the payment fake\'s or a test\'s): use the key of your payment service account.');
    if (isKnownSecret(KNOWN_WEBHOOK_SECRETS, env.STRIPE_WEBHOOK_SECRET)) problems.push('STRIPE_WEBHOOK_SECRET is a signing secret published in the Partwise source (the payment fake\'s or a test\'s): anyone could forge payment webhooks with it. Use the signing secret of your webhook endpoint.');
  }
  try {
    fitQueueMode(env);
  } catch (e) {
    if (!(e instanceof FitQueueConfigError)) throw e;
    problems.push(e.message);
  }
  return problems;
}
