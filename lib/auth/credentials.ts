import bcrypt from 'bcryptjs';
import { recordAudit, clientAddress } from '@/lib/audit';
import { consumeLimit, peekLimit, resetLimit } from '@/lib/rate-limit';
import { signInSchema } from '@/lib/accounts/schemas';
import { User } from '@/models';

/**
 * The credentials check behind next-auth's sign-in. Failed attempts are limited per
 * account and per client address (lib/rate-limit); each failure is
 * audited as `auth.signin_failed`. Errors thrown here reach the sign-in form as
 * next-auth's `error` string: 'unverified' or 'rate_limited'.
 */
export const SIGNIN_LIMITS = {
  perAccount: { limit: 5, windowMs: 15 * 60_000 },
  perAddress: { limit: 30, windowMs: 15 * 60_000 },
};

export const SIGNIN_ERRORS = { unverified: 'unverified', rateLimited: 'rate_limited' } as const;

// A valid bcrypt hash of nothing anyone types, so unknown accounts cost the same time.
const DUMMY_HASH = '$2b$10$Z..AXOQTKvswqFOavzPMvOVF0LfnQZLp2TOedVzQUSyj/udBLrV3a';

type HeaderBag = Headers | Record<string, string | string[] | undefined>;

function asRequest(headers: HeaderBag | undefined): Request {
  const h = new Headers();
  if (headers instanceof Headers) headers.forEach((v, k) => h.set(k, v));
  else for (const [k, v] of Object.entries(headers ?? {})) if (v !== undefined) h.set(k, Array.isArray(v) ? v.join(', ') : v);
  return new Request('http://signin.local/', { headers: h });
}

export async function authorizeCredentials(raw: unknown, headers?: HeaderBag): Promise<{ id: string; email: string; name: string; sessionGeneration: number } | null> {
  const parsed = signInSchema.safeParse(raw);
  if (!parsed.success) return null;
  const { email, password } = parsed.data;
  const request = asRequest(headers);
  const address = clientAddress(request) ?? 'unknown';
  const accountKey = `signin:account:${email}`;
  const addressKey = `signin:address:${address}`;

  const [byAccount, byAddress] = await Promise.all([peekLimit(accountKey, SIGNIN_LIMITS.perAccount), peekLimit(addressKey, SIGNIN_LIMITS.perAddress)]);
  if (!byAccount.ok || !byAddress.ok) {
    await recordAudit({ action: 'auth.signin_failed', actor: null, targetType: 'user', targetId: email, detail: { email, reason: 'rate_limited' }, request });
    throw new Error(SIGNIN_ERRORS.rateLimited);
  }

  const user = await User.findOne({ where: { email } });
  const ok = await bcrypt.compare(password, user?.passwordHash || DUMMY_HASH);
  if (!user || !ok) {
    await Promise.all([consumeLimit(accountKey, SIGNIN_LIMITS.perAccount), consumeLimit(addressKey, SIGNIN_LIMITS.perAddress)]);
    await recordAudit({ action: 'auth.signin_failed', actor: user ? { id: user.id, email: user.email } : null, targetType: 'user', targetId: user?.id ?? email, detail: { email, reason: user ? 'wrong_password' : 'unknown_account' }, request });
    return null;
  }
  if (!user.emailVerifiedAt) throw new Error(SIGNIN_ERRORS.unverified);
  await resetLimit(accountKey, SIGNIN_LIMITS.perAccount);
  await recordAudit({ action: 'auth.signin', actor: { id: user.id, email: user.email }, targetType: 'user', targetId: user.id, request });
  // The generation goes into the new session's JWT (lib/auth/sessions.ts).
  return { id: String(user.id), email: user.email, name: user.name, sessionGeneration: user.sessionGeneration };
}
