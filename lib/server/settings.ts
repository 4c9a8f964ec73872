/**
 * Settings a production server cannot run without, checked before it listens so a
 * missing secret is a clear start-up error, not a failure on someone's first sign-in.
 * Secrets come only from the environment; nothing here has a production default.
 */
export function productionSettingProblems(env: Record<string, string | undefined> = process.env): string[] {
  const problems: string[] = [];
  const local = env.PARTWISE_LOCAL === '1';
  const secret = env.NEXTAUTH_SECRET ?? env.AUTH_SECRET;
  if (!secret && !local) problems.push('NEXTAUTH_SECRET is not set: sessions cannot be signed. Set it to a long random string (for example `openssl rand -base64 48`).');
  else if (secret && secret.length < 32 && !local) problems.push(`NEXTAUTH_SECRET is only ${secret.length} characters long; use at least 32 random characters.`);
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
  return problems;
}
